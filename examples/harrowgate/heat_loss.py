"""Σ ψ·l of the Harrowgate Lane Library junction schedule (an invented demo project).

Reads schedule.csv beside this file; evaluates each junction's template either in-process or
through a running Coldseam service (--url), and prints one line per junction and the sum.
"""

from __future__ import annotations

import argparse
import csv
import json
import sys
import urllib.parse
import urllib.request
from pathlib import Path

HERE = Path(__file__).parent


def psi_local(template: str, parameters: dict) -> float:
    from coldseam.schema import parse_request
    from coldseam.templates import build
    from coldseam.thermal.evaluate import evaluate

    return evaluate(parse_request(build(template, parameters))).result["psi"]["value"]


def psi_remote(url: str, template: str, parameters: dict) -> float:
    query = urllib.parse.urlencode({"quantity": "psi", **parameters})
    with urllib.request.urlopen(f"{url}/api/v1/templates/{template}/value?{query}") as answer:
        return float(answer.read().decode())


def main() -> int:
    parser = argparse.ArgumentParser(description=__doc__)
    parser.add_argument("--url", help="a running Coldseam service, e.g. http://127.0.0.1:8000")
    parser.add_argument("--write-sections", action="store_true",
                        help="also write each junction's request to sections/")
    args = parser.parse_args()
    total = 0.0
    print(f"{'junction':28s} {'ψ W/(m·K)':>10s} {'l m':>7s} {'ψ·l W/K':>9s}")
    with open(HERE / "schedule.csv", newline="") as handle:
        for row in csv.DictReader(handle):
            parameters = json.loads(row["parameters"])
            if args.write_sections:
                write_section(row["junction"], row["template"], parameters)
            psi = (psi_remote(args.url, row["template"], parameters) if args.url
                   else psi_local(row["template"], parameters))
            length = float(row["length_m"])
            total += psi * length
            print(f"{row['junction']:28s} {psi:10.4f} {length:7.1f} {psi * length:9.2f}")
    print(f"{'Σ ψ·l':28s} {'':10s} {'':7s} {total:9.2f}")
    return 0


def write_section(junction: str, template: str, parameters: dict) -> None:
    from coldseam.templates import build

    folder = HERE / "sections"
    folder.mkdir(exist_ok=True)
    name = junction.split()[0].lower() + "-" + template.replace("_", "-") + ".json"
    (folder / name).write_text(json.dumps(build(template, parameters), indent=1) + "\n")


if __name__ == "__main__":
    sys.exit(main())
