#!/usr/bin/env python3
"""Writes the catalogue of bad inputs in tests/bad-inputs/ (models, weather files, variant
patches, measured data), each with the fragments its error must contain (.expect).
Checked by tests/e2e/catalogue.rs. Rerun after adding a case; review the diff."""
import json, copy, os, pathlib
root = pathlib.Path(__file__).resolve().parent.parent / "tests" / "bad-inputs"
GOOD = {
  "materials": [{"id": "brick", "conductivity_w_mk": 0.77, "density_kg_m3": 1700, "specific_heat_j_kgk": 800}],
  "constructions": [{"id": "solid", "layers": [{"material": "brick", "thickness_m": 0.22}]}],
  "zones": [{"id": "room", "floor_area_m2": 20, "volume_m3": 50, "comfort": {"min_c": 19, "max_c": 25}}],
  "opaque": [{"id": "walls", "construction": "solid", "zone": "room", "other_side": "outdoor", "area_m2": 40}],
  "openings": [{"id": "win", "zone": "room", "area_m2": 2, "u_value_w_m2k": 1.4, "g_value": 0.6}],
  "airflows": [{"id": "leaks", "zone": "room", "air_changes_per_h": 0.5}],
  "gains": [{"id": "people", "zone": "room", "power_w": 100, "schedule": "home"}],
  "heaters": [{"id": "rad", "zone": "room", "capacity_w": 2000, "setpoint_c": 20}],
  "schedules": [{"id": "home", "base": 0, "periods": [{"days": ["daily"], "from": "07:00", "to": "22:00", "value": 1}]}]
}
cases = {}
def case(name, mutate, *expect):
    m = copy.deepcopy(GOOD); mutate(m); cases[name] = (json.dumps(m, indent=1), expect)
def setp(path, value):
    def f(m):
        o = m
        for k in path[:-1]: o = o[k]
        o[path[-1]] = value
    return f
def delp(path):
    def f(m):
        o = m
        for k in path[:-1]: o = o[k]
        del o[path[-1]]
    return f
case("unknown-field", lambda m: m["zones"][0].update({"floor_area": 3}), "$.zones[0].floor_area", "did you mean `floor_area_m2`?")
case("unknown-material", setp(["constructions",0,"layers",0,"material"], "brik"), "$.constructions[0].layers[0].material", "unknown material `brik`", "did you mean `brick`?")
case("unknown-zone", setp(["opaque",0,"zone"], "rooom"), "$.opaque[0].zone", "did you mean `room`?")
case("unknown-other-side", setp(["opaque",0,"other_side"], "outdoors"), "$.opaque[0].other_side", "did you mean `outdoor`?")
case("unknown-schedule", setp(["gains",0,"schedule"], "hom"), "$.gains[0].schedule", "unknown schedule `hom`")
case("duplicate-zone", lambda m: m["zones"].append(dict(m["zones"][0])), "$.zones[1].id", "duplicate id `room`")
case("duplicate-element-id", setp(["openings",0,"id"], "walls"), "$.openings[0].id", "duplicate id `walls`")
case("missing-volume", delp(["zones",0,"volume_m3"]), "$.zones[0]", "missing field `volume_m3`")
case("wrong-type-area", setp(["opaque",0,"area_m2"], "forty"), "$.opaque[0].area_m2", "invalid type")
case("zero-thickness", setp(["constructions",0,"layers",0,"thickness_m"], 0), "$.constructions[0].layers[0].thickness_m", "must be positive")
case("negative-thickness", setp(["constructions",0,"layers",0,"thickness_m"], -0.1), "thickness is -0.1")
case("negative-conductivity", setp(["materials",0,"conductivity_w_mk"], -1), "$.materials[0].conductivity_w_mk")
case("zero-density", setp(["materials",0,"density_kg_m3"], 0), "$.materials[0].density_kg_m3")
case("zero-area", setp(["opaque",0,"area_m2"], 0), "$.opaque[0].area_m2", "area is 0")
case("g-value-above-one", setp(["openings",0,"g_value"], 1.2), "$.openings[0].g_value", "between 0 and 1")
case("negative-u-value", setp(["openings",0,"u_value_w_m2k"], -1), "$.openings[0].u_value_w_m2k")
case("frame-fraction-above-one", setp(["openings",0,"frame_fraction"], 1.5), "$.openings[0].frame_fraction")
case("tilt-out-of-range", setp(["opaque",0,"tilt_deg"], 200), "$.opaque[0].tilt_deg", "between 0 and 180")
case("absorptance-above-one", setp(["opaque",0,"solar_absorptance"], 1.3), "$.opaque[0].solar_absorptance")
case("empty-comfort-band", setp(["zones",0,"comfort"], {"min_c": 25, "max_c": 19}), "$.zones[0].comfort", "min_c must be below max_c")
case("airflow-both-rates", lambda m: m["airflows"][0].update({"flow_m3_h": 20}), "$.airflows[0]", "exactly one of air_changes_per_h and flow_m3_h")
case("heat-recovery-between-zones", lambda m: (m["zones"].append({"id": "hall", "floor_area_m2": 5, "volume_m3": 12}), m["airflows"].append({"id": "x", "zone": "hall", "from": "room", "flow_m3_h": 10, "heat_recovery": 0.5})), "$.airflows[1].heat_recovery", "only to air from outdoors")
case("heater-without-setpoint", delp(["heaters",0,"setpoint_c"]), "$.heaters[0]", "needs setpoint_c, setpoint_schedule or power_schedule")
case("heater-zero-capacity", setp(["heaters",0,"capacity_w"], 0), "$.heaters[0].capacity_w")
case("heater-into-foreign-element", setp(["heaters",0,"into"], "win"), "$.heaters[0].into")
case("cop-curve-unsorted", setp(["heaters",0,"cop_curve"], [{"outdoor_c": 7, "cop": 3.5}, {"outdoor_c": -7, "cop": 2.5}]), "$.heaters[0].cop_curve[1].outdoor_c", "rising order")
case("bad-clock", setp(["schedules",0,"periods",0,"from"], "7am"), "$.schedules[0].periods[0].from", "HH:MM")
case("bad-day", setp(["schedules",0,"periods",0,"days"], ["monday"]), "$.schedules[0].periods[0].days[0]", "`monday` is not a day")
case("bad-away-date", setp(["schedules",0,"away"], [{"from": "02-30", "to": "03-02", "value": 0}]), "$.schedules[0].away[0].from", "MM-DD")
case("ground-floor-without-perimeter", lambda m: m["opaque"].append({"id": "slab", "construction": "solid", "zone": "room", "other_side": "ground", "area_m2": 20, "tilt_deg": 180}), "$.opaque[1].exposed_perimeter_m", "ISO 13370")
case("zone-without-path", lambda m: m["zones"].append({"id": "cellar", "floor_area_m2": 5, "volume_m3": 10}), "$.zones[1]", "zone `cellar` has no path")
case("raw-node-without-path", lambda m: m.update({"network": {"nodes": [{"id": "mass", "capacitance_j_k": 1e6}]}}), "$.network.nodes[0]", "node `mass` has no path")
case("raw-negative-capacitance", lambda m: m.update({"network": {"nodes": [{"id": "mass", "capacitance_j_k": -5}], "links": [{"id": "l", "from": "mass", "to": "room", "conductance_w_k": 5}]}}), "$.network.nodes[0].capacitance_j_k")
case("raw-link-to-unknown-node", lambda m: m.update({"network": {"links": [{"id": "l", "from": "room", "to": "mas", "conductance_w_k": 5}]}}), "$.network.links[0].to", "unknown node, zone or boundary `mas`")
case("raw-self-link", lambda m: m.update({"network": {"links": [{"id": "l", "from": "room", "to": "room", "conductance_w_k": 5}]}}), "$.network.links[0].to", "join a node to itself")
case("latitude-out-of-range", lambda m: m.update({"site": {"latitude_deg": 95}}), "$.site.latitude_deg")
case("element-to-own-zone", setp(["opaque",0,"other_side"], "room"), "$.opaque[0].other_side", "own zone")
cases_files = {"models": cases}
# syntax error and empty
(root / "models").mkdir(parents=True, exist_ok=True)
for n, (text, exp) in cases.items():
    (root / "models" / f"{n}.json").write_text(text + "\n")
    (root / "models" / f"{n}.expect").write_text("\n".join(exp) + "\n")
(root / "models" / "syntax-error.json").write_text('{\n  "zones": [\n    {"id": "a",,}\n  ]\n}\n')
(root / "models" / "syntax-error.expect").write_text("syntax-error.json:3:16\nnot valid JSON\n")
(root / "models" / "empty.json").write_text("{}\n")
(root / "models" / "empty.expect").write_text("the model is empty\n")
(root / "models" / "not-an-object.json").write_text("[1, 2]\n")
(root / "models" / "not-an-object.expect").write_text("at $[0]:\ninvalid type\n")
# weather
W = root / "weather"; W.mkdir(exist_ok=True)
head = "time,air_c,ghi_w_m2,dhi_w_m2\n"
def rows(vals):
    return "".join(f"2025-01-01T{h:02d}:00+00:00,{v}\n" for h, v in vals)
wc = {
 "missing-hour": (head + rows([(0,"1,0,0"),(1,"1,0,0"),(3,"1,0,0")]), [".csv:4:"]),
 "duplicate-hour": (head + rows([(0,"1,0,0"),(1,"1,0,0"),(1,"1,0,0")]), [".csv:4:", "duplicate"]),
 "out-of-order": (head + rows([(0,"1,0,0"),(2,"1,0,0"),(1,"1,0,0")]), [".csv:4:"]),
 "nan-cell": (head + rows([(0,"1,0,0"),(1,"NaN,0,0"),(2,"1,0,0")]), [".csv:3:", "air_c"]),
 "empty-cell": (head + rows([(0,"1,0,0"),(1,",0,0"),(2,"1,0,0")]), [".csv:3:", "air_c"]),
 "air-too-hot": (head + rows([(0,"1,0,0"),(1,"75,0,0"),(2,"1,0,0")]), [".csv:3:", "air_c"]),
 "diffuse-above-global": (head + rows([(10,"1,100,300"),(11,"1,100,50")]), [".csv:2:", "diffuse"]),
 "irradiance-negative": (head + rows([(10,"1,-50,0"),(11,"1,100,50")]), [".csv:2:", "ghi_w_m2"]),
 "dst-jump": (head + "2025-03-30T00:00+01:00,1,0,0\n2025-03-30T01:00+01:00,1,0,0\n2025-03-30T03:00+02:00,1,0,0\n", [".csv:4:"]),
 "no-offset": (head + "2025-01-01T00:00,1,0,0\n2025-01-01T01:00,1,0,0\n", [".csv:2:"]),
 "unknown-column": ("time,air_c,humidity\n2025-01-01T00:00+00:00,1,80\n2025-01-01T01:00+00:00,1,80\n", ["humidity"]),
 "no-air-column": ("time,ghi_w_m2\n2025-01-01T00:00+00:00,0\n2025-01-01T01:00+00:00,0\n", ["air_c"]),
 "bad-number": (head + rows([(0,"1,0,0"),(1,"warm,0,0")]), [".csv:3:"]),
 # found by fuzzing (docs/fuzzing.md): a mistyped year must not make the reader fill 35 million hours
 "mistyped-year": (head + "2025-03-30T00:00+01:00,1,0,0\n6025-03-30T01:00+01:00,1,0,0\n2025-03-30T03:00+02:00,1,0,0\n", [".csv:3:", "is the date on this line mistyped?"]),
}
for n, (text, exp) in wc.items():
    (W / f"{n}.csv").write_text(text)
    (W / f"{n}.expect").write_text("\n".join(exp) + "\n")
# variants: merge patches on zones-examples/fernhollow-cabin.json
V = root / "variants"; V.mkdir(exist_ok=True)
vc = {
 "breaks-a-reference": ({"heaters": [{"id": "panel_heater", "zone": "nowhere", "capacity_w": 4500, "setpoint_c": 20}]}, ["unknown zone `nowhere`"]),
 "negative-capacity": ({"heaters": [{"id": "panel_heater", "zone": "main_room", "capacity_w": -1, "setpoint_c": 20}]}, ["$.heaters[0].capacity_w"]),
 "unknown-field": ({"mesh": {"depth_fractoin": 0.5}}, ["did you mean `depth_fraction`?"]),
 "removes-all-zones": ({"zones": None, "opaque": None, "openings": None, "airflows": None, "gains": None, "heaters": None}, ["the model is empty"]),
}
for n, (patch, exp) in vc.items():
    (V / f"{n}.json").write_text(json.dumps(patch, indent=1) + "\n")
    (V / f"{n}.expect").write_text("\n".join(exp) + "\n")
(V / "not-json.json").write_text("{ this is not json\n")
(V / "not-json.expect").write_text("not-json.json\n")
M = root / "measured"; M.mkdir(exist_ok=True)
mh = "time,indoor_c,outdoor_c,heating_w\n"
def mrows(n, f=lambda i: f"20,5,500"):
    return "".join(f"2025-01-01T{(i*15)//60:02d}:{(i*15)%60:02d}+00:00,{f(i)}\n" for i in range(n))
mc = {
 "missing-heating-column": ("time,indoor_c,outdoor_c\n" + "".join(f"2025-01-01T{h:02d}:00+00:00,20,5\n" for h in range(30)), ["heating_w"]),
 "nan-indoor": (mh + mrows(40, lambda i: "NaN,5,500" if i == 7 else "20,5,500"), [".csv:9:"]),
 "duplicate-stamp": (mh + mrows(5) + mrows(40)[len(mrows(4)):], ["csv:7:", "remove duplicates"]),
 "negative-heating": (mh + mrows(40, lambda i: "20,5,-300" if i == 3 else "20,5,500"), [".csv:5:", "heating_w"]),
 "irregular-interval": (mh + "2025-01-01T00:00+00:00,20,5,500\n2025-01-01T00:15+00:00,20,5,500\n2025-01-01T00:22+00:00,20,5,500\n", ["regular grid"]),
}
for n, (text, exp) in mc.items():
    (M / f"{n}.csv").write_text(text)
    (M / f"{n}.expect").write_text("\n".join(exp) + "\n")
