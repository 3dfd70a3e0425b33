"""Batches and junction schedules: the batch document (``spec``), CSV schedules
(``schedule``) and the results table as CSV and XLSX (``tables``). No web stack here: the
service (``coldseam.api.batches``) and the ``coldseam batch`` command share these."""
