"""The key reference (docs/reference.md) is generated from the loader's key tables and the code registry."""

from pathlib import Path

from steelfire import reference

ROOT = Path(__file__).resolve().parents[1]


def test_every_key_has_a_description():
    # a key the loader accepts but the reference does not describe fails here (KeyError names it)
    for table, keys in reference._table_keys().items():
        for k in keys:
            assert reference.DESCRIPTIONS[table][k].strip(), (table, k)


def test_docs_reference_is_current():
    # regenerate on purpose with: python -m steelfire.reference > docs/reference.md
    assert (ROOT / "docs" / "reference.md").read_text(encoding="utf-8") == reference.markdown()
