"""Readers and writers: LAS logs (through lasio) and CSV tables, converted to metres once."""

from .las import read_las, write_las
from .tables import read_column_table, read_dip_table, read_manifest, read_survey, read_tops
from .sniff import read_table
from .writers import write_survey, write_table, write_tops

__all__ = [
    "read_las",
    "write_las",
    "read_table",
    "read_tops",
    "read_survey",
    "read_dip_table",
    "read_column_table",
    "read_manifest",
    "write_table",
    "write_tops",
    "write_survey",
]
