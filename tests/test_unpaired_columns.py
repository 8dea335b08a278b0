"""A link whose tables name their columns differently: docket names the columns it leaves out and
offers --map pairs from the values, instead of comparing only the one column named alike."""

from __future__ import annotations

from pathlib import Path

import numpy as np
import pandas as pd

from docket.tui.cli import main

MAKERS = ["Velmora", "Quintrix", "Ostavel", "Brimwell", "Zentharo"]
KINDS = ["kettle", "lamp", "drill", "fan", "heater"]


def _shops(tmp: Path, *, price: bool = True) -> tuple[Path, Path]:
    # Invented listings: shop B has shop A's products under other column names.
    rng = np.random.default_rng(8)
    n = 60
    maker = rng.choice(MAKERS, n)
    kind = rng.choice(KINDS, n)
    code = [f"KX-{rng.integers(100, 999)}" for _ in range(n)]
    rows = list(zip(maker, kind, code, strict=True))
    a = pd.DataFrame({"id": [f"a{i}" for i in range(n)],
                      "title": [f"{m} {k} {c}" for m, k, c in rows],
                      "manufacturer": maker, "price": rng.integers(10, 500, n)})
    b = pd.DataFrame({"id": [f"b{i}" for i in range(n)],
                      "name": [f"{k} {c} {m}" for m, k, c in rows],
                      "brand": [m.upper() for m in maker], "price": a["price"]})
    if not price:
        a, b = a.drop(columns="price"), b.drop(columns="price")
    a.to_csv(tmp / "a.csv", index=False)
    b.to_csv(tmp / "b.csv", index=False)
    return tmp / "a.csv", tmp / "b.csv"


def test_new_names_the_unpaired_columns_and_the_maps_to_try(tmp_path: Path, capsys) -> None:
    a, b = _shops(tmp_path)
    assert main(["new", str(tmp_path / "s.docket"), "--left", str(a), "--right", str(b),
                 "--id", "id"]) == 0
    err = capsys.readouterr().err
    assert "columns not compared, as the other table has none of that name" in err
    assert "title, manufacturer" in err and "name, brand" in err
    assert "--map title=name --map manufacturer=brand" in err


def test_no_warning_once_every_column_is_paired(tmp_path: Path, capsys) -> None:
    a, b = _shops(tmp_path)
    assert main(["new", str(tmp_path / "s.docket"), "--left", str(a), "--right", str(b),
                 "--id", "id", "--map", "title=name", "--map", "manufacturer=brand"]) == 0
    assert "columns not compared" not in capsys.readouterr().err


def test_no_column_in_common_offers_the_maps(tmp_path: Path, capsys) -> None:
    a, b = _shops(tmp_path, price=False)
    project = tmp_path / "s.docket"
    assert main(["new", str(project), "--left", str(a), "--right", str(b), "--id", "id"]) == 2
    err = capsys.readouterr().err
    assert "no columns in common to compare" in err
    assert "--map title=name --map manufacturer=brand" in err
    assert not project.exists()


def test_values_a_number_field_cannot_read_are_said_to_count_as_missing(
        tmp_path: Path, capsys) -> None:
    # One shop writes 'ca. 120': compared as numbers, every such price was missing, unsaid.
    a, b = _shops(tmp_path)
    right = pd.read_csv(b)
    right["price"] = "ca. " + right["price"].astype(str)
    right.to_csv(b, index=False)
    assert main(["new", str(tmp_path / "s.docket"), "--left", str(a), "--right", str(b),
                 "--id", "id", "--map", "title=name", "--map", "manufacturer=brand",
                 "--field", "price:number"]) == 0
    err = capsys.readouterr().err
    assert "price, compared as number: in " in err and "60 of its 60 values read as no " \
        "number (for example 'ca. " in err
    assert "--field price:text" in err
    assert "a.csv" not in err.split("price, compared as number: in ")[1].split(",")[0]


def test_a_map_the_wrong_way_round_says_so(tmp_path: Path, capsys) -> None:
    a, b = _shops(tmp_path)
    project = tmp_path / "s.docket"
    assert main(["new", str(project), "--left", str(a), "--right", str(b), "--id", "id",
                 "--map", "name=title"]) == 2
    err = capsys.readouterr().err
    assert "--map name=title is the wrong way round" in err and "--map title=name" in err
    assert len(err.strip().splitlines()) == 1 and not project.exists()
