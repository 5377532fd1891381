"""The Python package against the command line it mirrors.

The outside reference here is the `patternproof` binary itself (built by
cargo; its path in PATTERNPROOF_CLI): every document the package returns
must be byte for byte the file or output the command line writes for the
same call, and every message the one it prints.
"""

import html
import json
import re
import os
import subprocess
from pathlib import Path

import numpy as np
import pytest
import shapely
from shapely.geometry import Polygon, shape

import patternproof

REPO = Path(__file__).resolve().parents[2]
POINTS = "demo-data/meadow-burrows.csv"
BOUNDARY = "demo-data/meadow-boundary.geojson"


@pytest.fixture(autouse=True)
def in_repo(monkeypatch):
    # The documents name the files as given, so both sides use the same
    # relative paths from the repository root.
    monkeypatch.chdir(REPO)


def cli(*args, check=True):
    exe = os.environ.get("PATTERNPROOF_CLI")
    if not exe:
        pytest.fail("set PATTERNPROOF_CLI to the patternproof binary (python/run-tests.sh does)")
    done = subprocess.run([exe, *args], cwd=REPO, capture_output=True, text=True)
    if check:
        assert done.returncode == 0, done.stderr
    return done


def cli_error(*args):
    """The message the command line prints for a refused run (exit 2)."""
    done = cli(*args, check=False)
    assert done.returncode == 2, done.stderr
    prefix = "patternproof: error: "
    line = [l for l in done.stderr.splitlines(keepends=True) if l.startswith(prefix)][0]
    return done.stderr[done.stderr.index(line) + len(prefix) :].rstrip("\n")


def demo_xy():
    rows = [l.split(",") for l in (REPO / POINTS).read_text().splitlines()[1:] if l]
    return [(float(r[1]), float(r[2])) for r in rows]


# ----------------------------------------------------------- same bytes


def test_write_report_writes_the_cli_folder(tmp_path):
    cli("audit", POINTS, "--boundary", BOUNDARY, "--sims", "99", "--out", str(tmp_path / "cli"), "--quiet")
    result = patternproof.audit(POINTS, boundaries=[BOUNDARY], sims=99)
    names = result.write_report(tmp_path / "py")
    made = sorted(p.name for p in (tmp_path / "py").iterdir())
    assert made == sorted(p.name for p in (tmp_path / "cli").iterdir())
    assert sorted(names) == sorted(n for n in made if n != ".patternproof")
    for name in made:
        a = (tmp_path / "cli" / name).read_bytes()
        b = (tmp_path / "py" / name).read_bytes()
        if name in ("index.html", ".patternproof"):
            continue
        assert a == b, name
    # The page differs only in the command it names.
    strip = lambda page: re.sub(r"<pre>[^<]*</pre>", "<pre></pre>", page)
    cli_page = (tmp_path / "cli" / "index.html").read_text()
    py_page = (tmp_path / "py" / "index.html").read_text()
    assert strip(cli_page) == strip(py_page)
    assert "write_report(" in py_page
    # A second write needs force=True, in the command line's words.
    with pytest.raises(patternproof.SettingError) as e:
        result.write_report(tmp_path / "py")
    assert "what to do:" in str(e.value)
    assert "report.json" in result.write_report(tmp_path / "py", force=True)
    with pytest.raises(patternproof.SettingError) as e:
        result.write_report(tmp_path / "other", picture_window="nowhere")
    assert str(e.value).startswith('picture_window="nowhere": no window has this id')
    assert not (tmp_path / "other").exists()


def _same_folder(cli_dir, py_dir, names):
    """Every file the command line wrote (sub-folders included), byte for
    byte, but the pages' command line (and the marker listing the files)."""
    made = sorted(str(p.relative_to(py_dir)) for p in py_dir.rglob("*") if p.is_file())
    assert made == sorted(str(p.relative_to(cli_dir)) for p in cli_dir.rglob("*") if p.is_file())
    assert sorted(names) == sorted(n for n in made if n != ".patternproof")
    strip = lambda page: re.sub(r"<pre>[^<]*</pre>", "<pre></pre>", page)
    for name in made:
        a = (cli_dir / name).read_bytes()
        b = (py_dir / name).read_bytes()
        if name == ".patternproof":
            continue
        if name.endswith("index.html"):
            assert strip(a.decode()) == strip(b.decode())
            if "<pre>" in a.decode():
                assert "write_report(" in b.decode(), name
            continue
        assert a == b, name


def test_scales_and_density_write_the_cli_folders(tmp_path):
    args = [POINTS, "--boundary", BOUNDARY, "--sims", "19", "--steps", "5", "--quiet"]
    cli("scales", *args, "--out", str(tmp_path / "k-cli"))
    k = patternproof.scales(POINTS, [BOUNDARY], sims=19, steps=5)
    _same_folder(tmp_path / "k-cli", tmp_path / "k-py", k.write_report(tmp_path / "k-py"))
    cli("density", POINTS, "--boundary", BOUNDARY, "--kernels", "gaussian", "--bandwidths", "scott",
        "--out", str(tmp_path / "d-cli"))
    d = patternproof.density(POINTS, [BOUNDARY], kernels="gaussian", bandwidths="scott")
    _same_folder(tmp_path / "d-cli", tmp_path / "d-py", d.write_report(tmp_path / "d-py"))
    with pytest.raises(patternproof.SettingError):
        d.write_report(tmp_path / "d-py")
    with pytest.raises(patternproof.SettingError) as e:
        patternproof.recheck("64", ratio="0.71").write_report(tmp_path / "r")
    assert "no report folder" in str(e.value)


def test_audit_json_is_the_cli_report_json(tmp_path):
    cli("audit", POINTS, "--boundary", BOUNDARY, "--out", str(tmp_path / "r"), "--quiet")
    expected = (tmp_path / "r" / "report.json").read_text()
    result = patternproof.audit(POINTS, boundaries=[BOUNDARY])
    assert result.to_json() == expected
    doc = json.loads(expected)
    assert result.verdict == doc["summary"]["verdict"]
    assert result.n == doc["input"]["n"] == 143
    assert result.mean_nn == doc["mean_nn"]
    assert result.rows == doc["results"]
    assert result.to_dict() == doc
    # The notebook shows the page's opening: the same matrix markup, one
    # row per window plus the header, and the sentence.
    page = result._repr_html_()
    assert page.count("<tr>") == 1 + len({row["window"] for row in doc["results"]})
    matrix = page[page.index('<table class="matrix">'):page.index("</table>") + len("</table>")]
    assert "<th><code>boundary</code></th>" in matrix
    assert matrix in (tmp_path / "r" / "index.html").read_text()
    assert html.escape(doc["summary"]["verdict"], quote=False) in page


def test_recheck_json_is_the_cli_output():
    expected = cli("recheck", "--n", "64", "--ratio", "0.71", "--z", "-4.9", "--p", "<0.001", "--json").stdout
    result = patternproof.recheck(64, ratio="0.71", z="-4.9", p="<0.001")
    assert result.to_json() == expected
    assert result.consistent is False
    assert result.verdict.startswith("inconsistent")
    page = result._repr_html_()
    assert "<td>z from R and n</td><td>z = -4.9</td><td>[-4.515, -4.362]</td><td>not ok</td>" in page


def test_recheck_with_points_is_the_cli_output():
    args = ["--n", "120", "--ratio", "0.8", "--points", POINTS, "--boundary", BOUNDARY, "--json"]
    expected = cli("recheck", *args).stdout
    result = patternproof.recheck("120", ratio="0.8", points=POINTS, boundaries=BOUNDARY)
    assert result.to_json() == expected


def test_scales_json_is_the_cli_scales_json(tmp_path):
    cli("scales", POINTS, "--boundary", BOUNDARY, "--out", str(tmp_path / "k"), "--quiet")
    expected = (tmp_path / "k" / "scales.json").read_text()
    result = patternproof.scales(POINTS, [BOUNDARY])
    assert result.to_json() == expected
    assert result.schema == "patternproof.scales/2"
    assert len(result.r) == 50
    doc = json.loads(expected)
    tests = [(w["id"], t["p"]) for w in doc["windows"] for t in w["tests"]]
    assert [(r["window"], r["p"]) for r in result.rows] == tests
    assert result._repr_html_().count("<td>isotropic</td>") == len(tests)


def test_density_json_is_the_cli_density_json(tmp_path):
    cli("density", POINTS, "--boundary", BOUNDARY, "--kernels", "gaussian,quartic",
        "--bandwidths", "scott,2x", "--out", str(tmp_path / "d"), "--quiet")
    expected = (tmp_path / "d" / "density.json").read_text()
    result = patternproof.density(POINTS, BOUNDARY, kernels="gaussian,quartic", bandwidths=["scott", "2x"])
    assert result.to_json() == expected
    doc = json.loads(expected)
    assert result.verdict == doc["verdict"]["sentence"]
    assert result.surfaces == doc["surfaces"]
    assert len(result.surfaces) == 2 * 2 * 2  # kernels × bandwidths × edges
    assert result._repr_html_().count("<td>quartic</td>") == 4


def test_a_geopackage_layer_is_read_as_the_cli_reads_it(tmp_path):
    gpkg = "reference/gpkg/survey.gpkg"
    cli("audit", gpkg, "--layer", "plots_utm", "--sims", "99", "--out", str(tmp_path / "g"), "--quiet")
    expected = (tmp_path / "g" / "report.json").read_text()
    # The reader's warnings, printed on stderr by the command line, are
    # Python warnings here and stay on the result.
    with pytest.warns(UserWarning, match="2 feature\\(s\\) without geometry skipped"):
        result = patternproof.audit(gpkg, layer="plots_utm", sims=99)
    assert result.to_json() == expected
    assert result.warnings == tuple(json.loads(expected)["input"]["warnings"])
    message = cli_error("audit", gpkg, "--layer", "plots_utm", "--where", "nothing", "--out", str(tmp_path / "n"))
    with pytest.raises(patternproof.SettingError) as e:
        patternproof.audit(gpkg, layer="plots_utm", where="nothing")
    assert str(e.value) == message


def test_sites_json_is_the_cli_sites_json(tmp_path):
    protocol = tmp_path / "protocol.json"
    cli("protocol", "new", "--window", "boundary", "--sims", "19", "--out", str(protocol))
    plots = sorted(str(p.relative_to(REPO)) for p in (REPO / "demo-data/plots").glob("*.csv"))
    cli("sites", "--protocol", str(protocol), "--coords", "projected", *plots,
        "--boundaries", "demo-data/plots-boundaries.geojson", "--sweep-sims", "19",
        "--out", str(tmp_path / "s"), "--quiet")
    expected = (tmp_path / "s" / "sites.json").read_text()
    kwargs = dict(coords="projected", boundaries="demo-data/plots-boundaries.geojson", sweep_sims=19)
    whole = patternproof.sites(protocol, plots, **kwargs)
    assert whole.to_json() == expected
    # One site at a time (what a distributed run does), then combined.
    plan = patternproof.plan_sites(protocol, plots, **kwargs)
    runs = [plan.run_site(i) for i in range(len(plan.names))]
    assert [r.row["site"] for r in runs] == list(plan.names)
    combined = plan.combine(runs)
    assert combined.to_json() == expected
    # Both write the command line's folder, every site's folder included.
    _same_folder(tmp_path / "s", tmp_path / "whole", whole.write_report(tmp_path / "whole"))
    _same_folder(tmp_path / "s", tmp_path / "pieces", combined.write_report(tmp_path / "pieces"))


# ------------------------------------------------------ in-memory inputs


def test_numpy_list_and_two_sequences_give_the_same_report():
    xy = demo_xy()
    kwargs = dict(coords="projected", boundaries=[BOUNDARY], sims=99)
    from_numpy = patternproof.audit(np.array(xy), **kwargs).to_json()
    from_list = patternproof.audit(xy, **kwargs).to_json()
    from_columns = patternproof.audit(([p[0] for p in xy], [p[1] for p in xy]), **kwargs).to_json()
    assert from_numpy == from_list == from_columns
    # numpy scalars are numbers like any other.
    numpy_options = dict(kwargs, sims=np.int64(99), buffers=[np.float64(0.5)])
    assert patternproof.audit(xy, **numpy_options).to_json() == patternproof.audit(xy, **dict(kwargs, buffers="0.5")).to_json()
    # The same figures as the file: only where the points came from differs.
    from_file = patternproof.audit(POINTS, [BOUNDARY], sims=99).to_dict()
    memory = json.loads(from_numpy)
    assert memory["results"] == from_file["results"]
    assert memory["input"]["points_file"] == "(points given in memory)"
    assert memory["provenance"]["inputs"] == from_file["provenance"]["inputs"][1:]


def test_a_table_of_named_columns_gives_the_same_report():
    xy = np.array(demo_xy())
    kwargs = dict(boundaries=[BOUNDARY], sims=99)
    from_array = patternproof.audit(xy, coords="projected", **kwargs).to_json()
    # A mapping of columns stands for any table (pandas, polars, pyarrow):
    # the columns are picked by name, as the CSV reader names them.
    table = {"burrow": [f"B{i}" for i in range(len(xy))], "X": xy[:, 0], "Y": list(xy[:, 1])}
    assert patternproof.audit(table, coords="projected", **kwargs).to_json() == from_array
    with pytest.raises(patternproof.SettingError) as e:
        patternproof.audit(table, **kwargs)
    assert 'coords="projected" (columns x, y or easting, northing)' in str(e.value)
    with pytest.raises(patternproof.SettingError) as e:
        patternproof.audit(table, coords="lonlat", **kwargs)
    assert "no columns lon, lat or longitude, latitude (it has burrow, X, Y)" in str(e.value)


def test_pandas_and_pyarrow_tables_give_the_numpy_report():
    import pandas as pd
    import pyarrow as pa

    frame = pd.read_csv(REPO / POINTS)
    kwargs = dict(boundaries=[BOUNDARY], coords="projected", sims=99)
    from_numpy = patternproof.audit(frame[["x", "y"]].to_numpy(), **kwargs).to_json()
    assert patternproof.audit(frame, **kwargs).to_json() == from_numpy
    assert patternproof.audit(pa.Table.from_pandas(frame), **kwargs).to_json() == from_numpy


class _ArrowOnly:
    """An Arrow producer with nothing but the PyCapsule interface, as a
    DuckDB result or any other library offers it."""

    def __init__(self, table):
        self._table = table

    def __arrow_c_stream__(self, requested_schema=None):
        return self._table.__arrow_c_stream__(requested_schema)


def test_any_arrow_producer_gives_the_numpy_report():
    import pyarrow as pa

    xy = np.array(demo_xy())
    kwargs = dict(boundaries=[BOUNDARY], coords="projected", sims=99)
    from_numpy = patternproof.audit(xy, **kwargs).to_json()
    table = pa.table({"site": ["m"] * len(xy), "Easting": xy[:, 0], "Northing": xy[:, 1]})
    # Split into batches of 50 rows: the stream is read batch by batch.
    batches = table.to_batches(max_chunksize=50)
    assert len(batches) == 3
    reader = pa.RecordBatchReader.from_batches(table.schema, batches)
    for given in (table, _ArrowOnly(table), reader):
        assert patternproof.audit(given, **kwargs).to_json() == from_numpy
    # Whole numbers and float32 are widened exactly (the demo has 0.01 m
    # steps; whole centimetres keep every value exact in both).
    cm = pa.table({"x": pa.array(np.round(xy[:, 0] * 100).astype(np.int64)),
                   "y": pa.array(np.round(xy[:, 1] * 100).astype(np.int32))})
    from_cm = patternproof.audit(np.round(xy * 100), coords="projected", sims=19).to_json()
    assert patternproof.audit(_ArrowOnly(cm), coords="projected", sims=19).to_json() == from_cm


class _ArrayOnly:
    """One record batch offered through ``__arrow_c_array__`` alone."""

    def __init__(self, array):
        self._array = array

    def __arrow_c_array__(self, requested_schema=None):
        return self._array.__arrow_c_array__(requested_schema)


def test_one_arrow_batch_or_struct_array_gives_the_numpy_report():
    import pyarrow as pa

    xy = np.array(demo_xy())
    kwargs = dict(boundaries=[BOUNDARY], coords="projected", sims=99)
    from_numpy = patternproof.audit(xy, **kwargs).to_json()
    batch = pa.record_batch({"x": xy[:, 0], "y": xy[:, 1]})
    struct = pa.StructArray.from_arrays([pa.array(xy[:, 0]), pa.array(xy[:, 1])], names=["lon_", "X"])
    renamed = pa.StructArray.from_arrays([pa.array(xy[:, 0]), pa.array(xy[:, 1])], names=["X", "Y"])
    assert patternproof.audit(_ArrayOnly(batch), **kwargs).to_json() == from_numpy
    assert patternproof.audit(_ArrayOnly(renamed), **kwargs).to_json() == from_numpy
    with pytest.raises(patternproof.SettingError) as e:
        patternproof.audit(_ArrayOnly(struct), **kwargs)
    assert "(it has lon_, X)" in str(e.value)
    with pytest.raises(patternproof.SettingError) as e:
        patternproof.audit(_ArrayOnly(pa.array(xy[:, 0])), **kwargs)
    assert "an Arrow array of Float64 has no named columns" in str(e.value)


def test_an_arrow_table_with_gaps_or_text_is_refused():
    import pyarrow as pa

    gaps = pa.table({"x": [1.0, None, 3.0], "y": [1.0, 2.0, 3.0]})
    with pytest.raises(patternproof.SettingError) as e:
        patternproof.audit(_ArrowOnly(gaps), coords="projected")
    assert "column x has 1 missing value(s), the first in row 2" in str(e.value)
    text = pa.table({"x": ["1", "2"], "y": [1.0, 2.0]})
    with pytest.raises(patternproof.SettingError) as e:
        patternproof.audit(_ArrowOnly(text), coords="projected")
    assert "column x holds Utf8, not numbers" in str(e.value)
    with pytest.raises(patternproof.SettingError) as e:
        patternproof.audit(_ArrowOnly(gaps))
    assert "does not say whether they are planar coordinates" in str(e.value)
    with pytest.raises(patternproof.SettingError) as e:
        patternproof.audit(_ArrowOnly(gaps), coords="lonlat")
    assert "no columns lon, lat or longitude, latitude (it has x, y)" in str(e.value)


def test_tables_out_are_the_documents_rows(tmp_path):
    import pyarrow as pa

    result = patternproof.audit(POINTS, boundaries=[BOUNDARY], sims=19)
    table = result.table()
    assert isinstance(table, pa.Table)
    rows = result.to_dict()["results"]
    assert table.num_rows == len(rows) == 29
    assert table.column_names == list(rows[0].keys())
    assert table.schema.field("ratio").type == pa.float64()
    assert table.schema.field("n_used").type == pa.int64()
    assert table.schema.field("call").type == pa.string()
    # The same values as the document, column by column.
    for name in table.column_names:
        assert table.column(name).to_pylist() == [r[name] for r in rows], name
    frame = table.to_pandas()
    assert list(frame["window"].unique()[:2]) == ["bbox", "hull"]
    # Any Arrow consumer takes the native table through the capsule.
    native = patternproof._arrow_table(rows)
    assert pa.table(native).equals(table)
    # Every result has its rows as a table.
    scales = patternproof.scales(POINTS, [BOUNDARY], sims=19, steps=5)
    assert scales.table().num_rows == len(scales.rows) > 0
    density = patternproof.density(POINTS, [BOUNDARY], kernels="gaussian", bandwidths="scott", edges="none")
    assert density.table().num_rows == len(density.surfaces) == 1
    recheck = patternproof.recheck("64", ratio="0.71", z="-4.9", p="<0.001")
    assert recheck.table().num_rows == 0


def test_numbers_in_memory_are_never_guessed():
    with pytest.raises(patternproof.SettingError) as e:
        patternproof.audit(np.array(demo_xy()))
    assert isinstance(e.value, ValueError)
    assert 'coords="projected"' in str(e.value) and "what to do:" in str(e.value)


def test_lonlat_in_memory_is_projected_as_a_lonlat_file(tmp_path):
    lonlat = [(10.0 + x / 1e5, 50.0 + y / 1e5) for x, y in demo_xy()]
    f = tmp_path / "ll.csv"
    f.write_text("lon,lat\n" + "".join(f"{x!r},{y!r}\n" for x, y in lonlat))
    from_file = patternproof.audit(str(f), sims=19).to_dict()
    memory = patternproof.audit(np.array(lonlat), coords="lonlat", sims=19).to_dict()
    assert memory["input"]["projection"] == from_file["input"]["projection"]
    assert memory["results"] == from_file["results"]


def test_a_shapely_polygon_is_a_boundary_through_geo_interface():
    ring = json.loads((REPO / BOUNDARY).read_text())["features"][0]["geometry"]
    polygon = shape(ring)
    assert isinstance(polygon, Polygon)
    by_file = patternproof.audit(POINTS, [BOUNDARY], sims=99).to_dict()
    by_shapely = patternproof.audit(POINTS, {"meadow-boundary": polygon}, sims=99).to_dict()
    by_wkt = patternproof.audit(POINTS, {"meadow-boundary": shapely.to_wkt(polygon, rounding_precision=-1)}, sims=99).to_dict()
    by_mapping = patternproof.audit(POINTS, {"meadow-boundary": ring}, sims=99).to_dict()
    by_wkb = patternproof.audit(POINTS, {"meadow-boundary": shapely.to_wkb(polygon)}, sims=99).to_dict()
    assert by_shapely["results"] == by_file["results"]
    assert by_wkt["results"] == by_file["results"] == by_mapping["results"] == by_wkb["results"]
    assert by_shapely["input"]["boundaries"] == [
        {"name": "meadow-boundary", "file": "(boundary meadow-boundary given in memory)"}
    ]
    # Only the points file is left to checksum.
    assert [d["file"] for d in by_shapely["provenance"]["inputs"]] == [POINTS]


# ------------------------------------------------------------- failures


def test_a_bad_setting_has_the_cli_message():
    expected = cli_error("audit", POINTS, "--alpha", "1.5", "--out", "/nonexistent/never")
    with pytest.raises(patternproof.SettingError) as e:
        patternproof.audit(POINTS, alpha=1.5)
    assert str(e.value) == expected
    assert isinstance(e.value, (patternproof.Error, ValueError))
    expected = cli_error("audit", POINTS, "--edges", "none,sideways", "--out", "/nonexistent/never")
    with pytest.raises(patternproof.SettingError) as e:
        patternproof.audit(POINTS, edges="none,sideways")
    assert str(e.value) == expected


def test_a_bad_file_is_an_input_error_with_the_cli_message(tmp_path):
    bad = tmp_path / "bad.csv"
    bad.write_text("x,y\n1,2\n3,oops\n")
    expected = cli_error("audit", str(bad), "--out", str(tmp_path / "never"))
    with pytest.raises(patternproof.InputError) as e:
        patternproof.audit(bad)
    assert str(e.value) == expected
    assert isinstance(e.value, ValueError)
    assert not (tmp_path / "never").exists()


def test_a_negative_count_is_refused_in_the_cli_words():
    with pytest.raises(patternproof.SettingError) as e:
        patternproof.audit(POINTS, sims=-1)
    assert str(e.value).startswith("--sims -1: not a whole number of 0 or more")
    with pytest.raises(patternproof.SettingError):
        patternproof.audit(POINTS, seed=1.5)


def test_too_few_points():
    with pytest.raises(patternproof.TooFewPointsError) as e:
        patternproof.audit([(1.0, 2.0)], coords="projected")
    assert "at least two points" in str(e.value)
    assert not isinstance(e.value, ValueError)


def test_no_testable_window():
    # On one line along an axis: no rectangle, no hull, so no window.
    on_a_line = [(float(i), 5.0) for i in range(40)]
    with pytest.raises(patternproof.NoTestableWindowError) as e:
        patternproof.audit(on_a_line, coords="projected", sims=0)
    assert "no window could be tested" in str(e.value)


def test_a_changed_protocol(tmp_path):
    protocol = tmp_path / "protocol.json"
    cli("protocol", "new", "--sims", "19", "--out", str(protocol))
    protocol.write_text(protocol.read_text().replace('"sims": 19', '"sims": 99'))
    expected = cli_error("sites", "--protocol", str(protocol), POINTS, "--out", str(tmp_path / "never"))
    with pytest.raises(patternproof.ProtocolError) as e:
        patternproof.sites(protocol, POINTS)
    assert str(e.value) == expected
    assert "CHANGED" in str(e.value)


def test_sites_that_do_not_fit(tmp_path):
    protocol = tmp_path / "protocol.json"
    cli("protocol", "new", "--sims", "19", "--out", str(protocol))
    with pytest.raises(patternproof.SitesError) as e:
        patternproof.sites(protocol, [POINTS, POINTS], site_field="burrow")
    assert "exactly one point file" in str(e.value)


def test_a_boundary_that_is_not_a_polygon_is_refused():
    with pytest.raises(patternproof.SettingError) as e:
        patternproof.audit(POINTS, "LINESTRING(0 0, 10 10)")
    assert str(e.value).startswith("boundaries[0]: a boundary must be polygons")
    with pytest.raises(patternproof.SettingError) as e:
        patternproof.audit(POINTS, shapely.to_wkb(shapely.Point(1, 2)))
    assert "a boundary must be polygons" in str(e.value)


def test_every_class_is_an_error():
    for name in ["InputError", "SettingError", "TooFewPointsError", "NoTestableWindowError",
                 "ProtocolError", "SitesError", "InputGoneError", "NotFiniteError", "StoppedError",
                 "InternalError"]:
        assert issubclass(getattr(patternproof, name), patternproof.Error)
    assert issubclass(patternproof.InputGoneError, OSError)
    assert issubclass(patternproof.NotFiniteError, ValueError)


def test_the_docstring_examples_run():
    import doctest

    import patternproof.errors

    for module in (patternproof, patternproof.errors):
        failures, tried = doctest.testmod(module)
        assert failures == 0, module.__name__
        assert tried > 0, module.__name__


def test_ctrl_c_stops_a_long_run_and_leaves_nothing_running():
    import signal
    import threading
    import time

    # 999 999 simulations in each of 7 windows: minutes of work, which a
    # SIGINT half a second in must cut short. The interrupt is raised from
    # inside the call (the native wait loop), not after the run.
    timer = threading.Timer(0.5, lambda: os.kill(os.getpid(), signal.SIGINT))
    started = time.monotonic()
    timer.start()
    with pytest.raises(KeyboardInterrupt) as e:
        patternproof.audit(POINTS, [BOUNDARY], sims=999_999)
    waited = time.monotonic() - started
    timer.join()
    assert "_native.audit(" in str(e.traceback[-1].statement), e.traceback[-1]
    # The run stopped long before its end (it needs minutes): a generous
    # bound, not a speed goal.
    assert waited < 60, waited
    assert threading.active_count() == 1
    # The engine is ready for the next call.
    assert patternproof.audit(POINTS, [BOUNDARY], sims=19).n == 143


def test_a_protocol_is_the_cli_protocol_file(tmp_path):
    cli("protocol", "new", "--window", "boundary", "--sims", "199", "--adjust", "bh",
        "--note", "meadow plots", "--out", str(tmp_path / "cli.json"))
    p = patternproof.protocol(window="boundary", sims=199, adjust="bh", note="meadow plots")
    written = p.write(tmp_path / "py.json")
    assert Path(written).read_bytes() == (tmp_path / "cli.json").read_bytes()
    assert patternproof.read_protocol(tmp_path / "cli.json").sha256 == p.sha256
    assert p.to_dict()["window"] == {"rule": "boundary"}
    with pytest.raises(patternproof.SettingError):
        p.write(tmp_path / "py.json")
    # Refused in the command line's words.
    want = cli_error("protocol", "new", "--window", "hull+x", "--out", str(tmp_path / "x.json"))
    with pytest.raises(patternproof.SettingError) as e:
        patternproof.protocol(window="hull+x")
    assert str(e.value) == want
    # A file edited after it was written is refused, as `protocol show` does.
    edited = tmp_path / "edited.json"
    edited.write_text((tmp_path / "cli.json").read_text().replace('"sims": 199', '"sims": 99'))
    want = cli_error("protocol", "show", str(edited))
    with pytest.raises(patternproof.ProtocolError) as e:
        patternproof.read_protocol(edited)
    assert str(e.value) == want
