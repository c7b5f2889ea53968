"""Regenerate the invented demo field (Velmora Ridge) into this folder, from the default seed."""

from pathlib import Path

from wellfault.synth.fieldgen import DEFAULT_SEED, describe_field, make_demo_field

if __name__ == "__main__":
    here = Path(__file__).resolve().parent
    make_demo_field(here, seed=DEFAULT_SEED)
    print(describe_field(here))
