"""The ``roomfit import`` command's shell: missing extra, bad files and outputs (exit 2)."""

from __future__ import annotations

from pathlib import Path

import pytest

from roomfit.cli import main


def test_without_the_extra_it_says_how_to_install(monkeypatch: pytest.MonkeyPatch, tmp_path: Path,
                                                  capsys: pytest.CaptureFixture[str]) -> None:
    pytest.importorskip("ifcopenshell", reason="the ifc extra is not installed")
    import roomfit.plan.ifc_read as ifc_read

    monkeypatch.setattr(ifc_read, "ifcopenshell", None)
    assert main(["import", str(tmp_path / "m.ifc"), "-o", str(tmp_path / "p.toml")]) == 2
    assert 'pip install "roomfit[ifc]"' in capsys.readouterr().err


@pytest.mark.parametrize("content, message", [
    ("not a model at all", "not a readable IFC file"),
    (None, "no such file"),
])
def test_bad_model_is_a_located_message(tmp_path: Path, capsys: pytest.CaptureFixture[str],
                                        content: str | None, message: str) -> None:
    pytest.importorskip("ifcopenshell", reason="the ifc extra is not installed")
    model = tmp_path / "bad.ifc"
    if content is not None:
        model.write_text(content)
    assert main(["import", str(model), "-o", str(tmp_path / "p.toml")]) == 2
    err = capsys.readouterr().err
    assert str(model) in err and message in err and "Traceback" not in err
    assert not (tmp_path / "p.toml").exists()


def test_never_writes_over_the_model(tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    pytest.importorskip("ifcopenshell", reason="the ifc extra is not installed")
    model = tmp_path / "m.ifc"
    model.write_text("ISO-10303-21;")
    assert main(["import", str(model), "-o", str(model)]) == 2
    assert model.read_text() == "ISO-10303-21;"

