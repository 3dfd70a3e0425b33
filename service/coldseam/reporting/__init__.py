"""Pictures and printable reports of evaluations."""
