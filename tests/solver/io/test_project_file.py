"""Project file: round trips, schema, and one-line errors that name the file and the field."""

from __future__ import annotations

import copy
import json
from pathlib import Path

import jsonschema
import pytest

import solver
from solver import (
    PROJECT_FORMAT_VERSION,
    Circle,
    Conductor,
    Dielectric,
    GroundPlane,
    Model,
    Polygon,
    ProjectFileError,
    Rectangle,
    Ring,
    Strip,
    load_project,
    model_from_dict,
    model_to_dict,
    save_project,
)

SCHEMA = json.loads((Path(solver.__file__).parent / "io" / "project_schema.json").read_text(encoding="utf-8"))


def every_kind_model() -> Model:
    """A model using every shape kind, role and optional field."""
    return Model(
        unit="mil",
        title="All kinds",
        description="Every shape, role and option once.",
        background_eps_r=2.2,
        mesh_density="fine",
        ground_plane=GroundPlane(-5.0),
        conductors=(
            Conductor("wire", (Circle((0.0, 10.0), 1.5),), role="fixed", potential_V=3.3, color="#11aa22"),
            Conductor("tube", (Ring((20.0, 10.0), 2.0, 2.5),), role="floating", charge_C_per_m=-1e-12),
            Conductor("bar", (Rectangle((40.0, 10.0), 8.0, 2.0, 0.5), Rectangle((40.0, 14.0), 2.0, 2.0)),
                      role="fixed", potential_V=-1.0),
            Conductor("frame", (Polygon(((50.0, 0.0), (70.0, 0.0), (70.0, 20.0), (50.0, 20.0)),
                                        (((55.0, 5.0), (65.0, 5.0), (65.0, 15.0), (55.0, 15.0)),)),),
                      role="reference"),
            Conductor("foil", (Strip(((80.0, 5.0), (90.0, 5.0), (95.0, 8.0))),), role="fixed", potential_V=0.5),
        ),
        dielectrics=(
            Dielectric("sleeve", (Ring((20.0, 10.0), 2.5, 3.5),), 3.0, "PTFE"),
            Dielectric("slab", (Polygon(((0.0, 0.0), (10.0, 0.0), (10.0, 4.0))), Rectangle((5.0, 30.0), 4.0, 4.0)), 4.4),
        ),
        extras={"view": {"zoom": 2.5, "center": [1, 2]}, "notes": ["a", None, True]},
    )


def test_round_trip_keeps_every_shape_kind_and_field():
    model = every_kind_model()
    data = json.loads(json.dumps(model_to_dict(model)))
    back = model_from_dict(data)
    assert back == model
    assert back.extras == model.extras
    kinds = {s["kind"] for c in data["conductors"] for s in c["shapes"]}
    assert kinds == {"circle", "ring", "rectangle", "polygon", "strip"}
    assert data["format"] == "edgewise-project" and data["version"] == PROJECT_FORMAT_VERSION


def test_save_and_load_round_trip(tmp_path):
    model = every_kind_model()
    path = tmp_path / "all.json"
    save_project(model, path)
    back = load_project(path)
    assert back == model and back.extras == model.extras
    assert [p.name for p in tmp_path.iterdir()] == ["all.json"]  # no temporary file left


def test_extras_are_copied_not_shared():
    model = every_kind_model()
    data = model_to_dict(model)
    data["extras"]["view"]["zoom"] = 9.0
    assert model.extras["view"]["zoom"] == 2.5


def test_optional_fields_take_defaults():
    data = {"format": "edgewise-project", "version": 1, "unit": "mm",
            "conductors": [{"name": "a", "role": "floating", "shapes": [
                {"kind": "rectangle", "center": [0, 0], "width": 1, "height": 2}]}]}
    model = model_from_dict(data)
    assert model.background_eps_r == 1.0 and model.mesh_density == "normal" and model.ground_plane is None
    assert model.conductors[0].charge_C_per_m == 0.0
    assert model.conductors[0].shapes[0] == Rectangle((0.0, 0.0), 1.0, 2.0, 0.0)
    assert model.extras == {} and model.dielectrics == ()


def test_model_to_dict_validates_against_schema():
    jsonschema.Draft202012Validator.check_schema(SCHEMA)
    jsonschema.validate(model_to_dict(every_kind_model()), SCHEMA)


@pytest.mark.parametrize("change", [
    lambda d: d["conductors"][0].update(role="ground"),
    lambda d: d["conductors"][0]["shapes"][0].update(kind="ellipse"),
    lambda d: d["conductors"][0]["shapes"][0].update(radius="abc"),
    lambda d: d["conductors"][3].update(potential_V=1.0),
    lambda d: d.update(version=2),
    lambda d: d["conductors"][0].update(colour="#ffffff"),
    lambda d: d["conductors"][1].update(potential_V=1.0),
    lambda d: d["dielectrics"][0].update(shapes=[{"kind": "strip", "points": [[0, 0], [1, 0]]}]),
])
def test_schema_rejects_what_the_reader_rejects(change):
    data = model_to_dict(every_kind_model())
    change(data)
    with pytest.raises(jsonschema.ValidationError):
        jsonschema.validate(data, SCHEMA)
    with pytest.raises(ProjectFileError):
        model_from_dict(data)


# ---- bad files ---------------------------------------------------------------------------------
def coax_dict() -> dict:
    return model_to_dict(Model(unit="mm", conductors=(
        Conductor("inner", (Circle((0.0, 0.0), 1.0),), role="fixed", potential_V=1.0),
        Conductor("shield", (Ring((0.0, 0.0), 3.5, 4.0),), role="reference"))))


def _delete(path):
    def change(d):
        *head, last = path
        target = d
        for key in head:
            target = target[key]
        del target[last]
    return change


def _set(path, value):
    def change(d):
        *head, last = path
        target = d
        for key in head:
            target = target[key]
        target[last] = value
    return change


BAD_CASES = [
    (_set(["conductors", 0, "shapes", 0, "radius"], "abc"),
     'conductors[0].shapes[0].radius: expected a number, got "abc"'),
    (_delete(["conductors", 0, "shapes", 0, "radius"]),
     "conductors[0].shapes[0].radius: missing (this field is required)"),
    (_set(["conductors", 1, "role"], "ground"),
     'conductors[1].role: "ground" is not one of fixed, floating, reference'),
    (_delete(["conductors", 1, "role"]),
     "conductors[1].role: missing (one of fixed, floating, reference)"),
    (_set(["conductors", 0, "shapes", 0, "kind"], "ellipse"),
     'conductors[0].shapes[0].kind: "ellipse" is not one of circle, ring, rectangle, polygon, strip'),
    (_set(["conductors", 0, "shapes", 0, "radus"], 2.0),
     "conductors[0].shapes[0].radus: unknown field (allowed here: center, kind, radius)"),
    (_set(["version"], 7),
     "version 7 is newer than this program understands (1); update Edgewise to open it"),
    (_set(["version"], "1"), 'version: expected a whole number, got "1"'),
    (_set(["version"], 0), "version: 0 is not a valid format version (versions start at 1)"),
    (_delete(["format"]), 'format: not an Edgewise project (expected "format": "edgewise-project", got nothing)'),
    (_delete(["unit"]), "unit: missing (this field is required)"),
    (_set(["unit"], "cm"), 'unit: "cm" is not one of m, mm, um, mil, inch'),
    (_set(["conductors", 1, "name"], "inner"),
     "conductors: Conductor name 'inner' is used more than once; names must be unique"),
    (_set(["conductors", 0, "name"], " "), "conductors[0].name: must not be empty"),
    (_set(["conductors", 0, "shapes", 0, "radius"], -1.0),
     "conductors[0].shapes[0].radius: must be greater than 0, got -1.0"),
    (_set(["conductors", 1, "shapes", 0, "outer_radius"], 3.0),
     "conductors[1].shapes[0].outer_radius: must be greater than inner_radius (3.5), got 3"),
    (_set(["conductors", 0, "potential_V"], True), "conductors[0].potential_V: expected a number, got true"),
    (_delete(["conductors", 0, "potential_V"]), "conductors[0].potential_V: missing (this field is required)"),
    (_set(["conductors", 1, "potential_V"], 0.0),
     "conductors[1].potential_V: only a 'fixed' conductor has a set potential (this one is 'reference')"),
    (_set(["conductors", 0, "color"], "red"), 'conductors[0].color: expected a colour "#rrggbb", got "red"'),
    (_set(["conductors", 0, "shapes"], []), "conductors[0].shapes: needs at least 1 shape, got 0"),
    (_set(["conductors", 0, "shapes", 0, "center"], [0.0]),
     "conductors[0].shapes[0].center: expected a point [x, y], got a list"),
    (_set(["ground_plane"], {"y": "low"}), 'ground_plane.y: expected a number, got "low"'),
    (_set(["background_eps_r"], 0.5), "background_eps_r: must be at least 1, got 0.5"),
    (_set(["mesh_density"], "ultra"), 'mesh_density: "ultra" is not one of coarse, normal, fine'),
    (_set(["extras"], [1, 2]), "extras: expected an object, got a list"),
    (_set(["dielectrics"], [{"name": "film", "eps_r": 3.0, "shapes": [{"kind": "strip", "points": [[0, 0], [1, 0]]}]}]),
     "dielectrics[0].shapes[0].kind: a dielectric region cannot be a zero-thickness strip; use a polygon"),
    (_set(["dielectrics"], [{"name": "film", "eps_r": 0.9, "shapes": []}]),
     "dielectrics[0].eps_r: must be at least 1, got 0.9"),
]


@pytest.mark.parametrize("change, expected", BAD_CASES, ids=[c[1].split(":")[0] for c in BAD_CASES])
def test_bad_file_names_file_and_field(tmp_path, change, expected):
    data = coax_dict()
    change(data)
    path = tmp_path / "coax.json"
    path.write_text(json.dumps(data), encoding="utf-8")
    with pytest.raises(ProjectFileError) as info:
        load_project(path)
    assert str(info.value) == f"{path}: {expected}"


def test_not_json_reports_line_and_column(tmp_path):
    path = tmp_path / "x.json"
    path.write_text('{"format": "edgewise-project",\n "version": 1\n "unit": "mm"}', encoding="utf-8")
    with pytest.raises(ProjectFileError) as info:
        load_project(path)
    assert str(info.value) == f"{path}: not JSON (line 3, column 2: Expecting ',' delimiter)"


def test_non_finite_number_is_refused(tmp_path):
    path = tmp_path / "nan.json"
    path.write_text(json.dumps(coax_dict()).replace('"potential_V": 1.0', '"potential_V": NaN'), encoding="utf-8")
    with pytest.raises(ProjectFileError) as info:
        load_project(path)
    assert str(info.value) == f"{path}: not valid JSON: NaN is not allowed; write a finite number"


def test_top_level_must_be_an_object(tmp_path):
    path = tmp_path / "list.json"
    path.write_text("[1, 2]", encoding="utf-8")
    with pytest.raises(ProjectFileError) as info:
        load_project(path)
    assert str(info.value) == f"{path}: expected a JSON object at the top level, got a list"


def test_missing_file(tmp_path):
    path = tmp_path / "missing.json"
    with pytest.raises(ProjectFileError) as info:
        load_project(path)
    assert str(info.value) == f"{path}: file not found"


def test_model_from_dict_names_its_source():
    data = coax_dict()
    data["conductors"][0]["shapes"][0]["radius"] = None
    with pytest.raises(ProjectFileError, match=r"^clipboard: conductors\[0\]\.shapes\[0\]\.radius: expected a number, got null$"):
        model_from_dict(data, source="clipboard")


def test_all_errors_are_one_line(tmp_path):
    for change, _ in BAD_CASES:
        data = coax_dict()
        change(data)
        with pytest.raises(ProjectFileError) as info:
            model_from_dict(data, "f.json")
        assert "\n" not in str(info.value)


def test_failed_save_leaves_existing_file_untouched(tmp_path):
    path = tmp_path / "keep.json"
    path.write_text("original", encoding="utf-8")
    bad = Model(unit="mm", conductors=(Conductor("a", (Circle((0, 0), 1.0),)),), extras={"oops": {1, 2}})
    with pytest.raises(ProjectFileError, match=r"keep\.json: cannot write the model as JSON"):
        save_project(bad, path)
    assert path.read_text(encoding="utf-8") == "original"
    assert [p.name for p in tmp_path.iterdir()] == ["keep.json"]


def test_save_replaces_existing_file_and_keeps_its_permissions(tmp_path):
    path = tmp_path / "model.json"
    path.write_text("old", encoding="utf-8")
    path.chmod(0o640)
    model = Model(unit="um", conductors=(Conductor("a", (Circle((0, 0), 1.0),)),))
    save_project(model, path)
    assert load_project(path) == model
    assert path.stat().st_mode & 0o777 == 0o640


def test_save_into_missing_folder_is_a_project_file_error(tmp_path):
    model = Model(unit="mm", conductors=(Conductor("a", (Circle((0, 0), 1.0),)),))
    with pytest.raises(ProjectFileError, match=r"nowhere[/\\]m\.json: cannot be written"):
        save_project(model, tmp_path / "nowhere" / "m.json")


def test_dict_input_is_not_modified():
    data = coax_dict()
    before = copy.deepcopy(data)
    model_from_dict(data)
    assert data == before


def test_example_in_the_reference_loads():
    text = (Path(__file__).resolve().parents[3] / "docs" / "project_file.md").read_text(encoding="utf-8")
    block = text.split("```json\n", 1)[1].split("```", 1)[0]
    data = json.loads(block)
    jsonschema.validate(data, SCHEMA)
    model = model_from_dict(data, "docs/project_file.md")
    assert model.conductor_names == ("inner", "shield")
