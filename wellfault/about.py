"""What the package says of itself: its version and the caution every command and report that
shows cuts carries."""

from __future__ import annotations



CAUTION = (
    "CAUTION: fault cuts are interpretations. These results are aids for a qualified "
    "geoscientist, to be checked against the logs, other wells and seismic; they are not the "
    "sole basis for drilling, well-control or completion decisions. Follow local regulations "
    "and company practice."
)


__version__ = "0.1.0"
