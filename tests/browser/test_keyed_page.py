"""The page against a live server that needs an access key: without one it says so in plain
words and opens the key field; a malformed or refused key is named as such; with the right key
every API request the page makes carries it (never in the address) and the template flow, the
result and a server-made download work."""

from __future__ import annotations

import pytest
from browser_support import TEST_KEY, clean_problems, shot

pytestmark = pytest.mark.browser

EVALUATION_TIMEOUT = 90_000  # ms


def api_requests(page) -> list:
    seen: list = []
    page.on("request", lambda r: seen.append(r) if "/api/" in r.url else None)
    return seen


def use_key(page, text: str) -> None:
    page.get_by_test_id("api-key").fill(text)
    page.get_by_test_id("key-save").click()


def test_keyed_server_asks_for_the_key_then_works_with_it(keyed_server, page_factory):
    page = page_factory(1280)
    seen = api_requests(page)
    page.goto(f"{keyed_server}/")
    message = page.get_by_test_id("error-message").first
    message.wait_for()
    assert message.inner_text().startswith("This server needs an access key.")
    assert "Bearer" not in message.inner_text()
    assert page.get_by_test_id("key-form").is_visible()  # opened by itself
    assert "needs an access key" in page.get_by_test_id("key-status").inner_text()
    shot(page, "keyed-no-key-1280")

    use_key(page, "two words")
    assert "without spaces" in page.get_by_test_id("key-error").inner_text()
    assert page.evaluate("() => sessionStorage.length") == 0

    use_key(page, "not-the-key")
    page.get_by_test_id("key-error").wait_for(state="hidden")
    page.locator("[data-testid=error-message]", has_text="did not accept").wait_for()

    first_keyed = len(seen)
    use_key(page, f"  {TEST_KEY} ")
    picker = page.get_by_test_id("template-picker")
    picker.wait_for()
    assert picker.locator("option").count() >= 5
    assert page.evaluate("() => Object.values(sessionStorage)") == [TEST_KEY]
    picker.select_option("wall_corner")
    page.get_by_test_id("section-preview").wait_for()
    page.wait_for_function("() => !document.querySelector('[data-testid=evaluate]').disabled")
    page.get_by_test_id("evaluate").click()
    page.get_by_test_id("psi-value").wait_for(timeout=EVALUATION_TIMEOUT)
    with page.expect_download() as download:
        page.get_by_test_id("download-png").click()
    with open(download.value.path(), "rb") as picture:
        assert picture.read(8) == b"\x89PNG\r\n\x1a\n"
    shot(page, "keyed-results-1280")

    keyed = seen[first_keyed:]
    assert len(keyed) >= 5
    assert all(r.headers.get("authorization") == f"Bearer {TEST_KEY}" for r in keyed), \
        [r.url for r in keyed if r.headers.get("authorization") != f"Bearer {TEST_KEY}"]
    assert all(TEST_KEY not in r.url for r in seen) and TEST_KEY not in page.url
    assert clean_problems(page) == []


def test_key_lasts_for_the_tab_only(keyed_server, page_factory):
    page = page_factory(1280)
    page.goto(f"{keyed_server}/")
    page.get_by_test_id("key-form").wait_for()
    use_key(page, TEST_KEY)
    page.get_by_test_id("template-picker").wait_for()
    page.reload()
    page.get_by_test_id("template-picker").wait_for()  # same tab: still set
    other = page_factory(1280)  # a new browser context, as a new tab of another session
    other.goto(f"{keyed_server}/")
    assert other.get_by_test_id("error-message").first.inner_text().startswith(
        "This server needs an access key.")


def test_open_server_page_needs_no_key(server, page_factory):
    page = page_factory(1280)
    page.goto(f"{server}/")
    page.get_by_test_id("template-picker").wait_for()
    assert page.get_by_test_id("key-form").is_hidden()
    page.get_by_test_id("key-button").click()
    assert "No key set" in page.get_by_test_id("key-status").inner_text()
