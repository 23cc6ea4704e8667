//! The JSON Schemas of the board and part files (`pinlow schema`), checked with an independent
//! validator (the `jsonschema` crate) against every board and part file of the repository, the
//! fixtures the readers refuse, and probes at the edge of every range the schemas state, each
//! also read by pinlow's own readers: the schema and the reader must agree.

use std::path::{Path, PathBuf};

use assert_cmd::Command;
use pinlow::board::parse_board;
use pinlow::parts::{read_part, Library, PartSource};
use pinlow::schema::FileKind;
use pinlow::Error;
use serde_json::{json, Value};

/// Set this variable to rewrite `docs/schema/*.json` from the code.
const REGENERATE: &str = "PINLOW_WRITE_SCHEMAS";

fn root() -> PathBuf {
    PathBuf::from(env!("CARGO_MANIFEST_DIR"))
}

fn validator(kind: FileKind) -> jsonschema::Validator {
    // Building the validator also checks the schema against the draft 2020-12 meta-schema.
    jsonschema::validator_for(&kind.schema()).expect("a valid draft 2020-12 schema")
}

fn errors(v: &jsonschema::Validator, doc: &Value) -> Vec<String> {
    v.iter_errors(doc)
        .map(|e| format!("{} at {}", e, e.instance_path()))
        .collect()
}

fn json_files(dir: &str) -> Vec<PathBuf> {
    let mut files: Vec<PathBuf> = std::fs::read_dir(root().join(dir))
        .unwrap_or_else(|e| panic!("{dir}: {e}"))
        .map(|e| e.expect("entry").path())
        .filter(|p| p.extension().is_some_and(|x| x == "json"))
        .collect();
    files.sort();
    assert!(!files.is_empty(), "{dir} holds no JSON file");
    files
}

fn read_json(path: &Path) -> Value {
    let text = std::fs::read_to_string(path).unwrap_or_else(|e| panic!("{}: {e}", path.display()));
    serde_json::from_str(&text).unwrap_or_else(|e| panic!("{}: {e}", path.display()))
}

/// The shipped parts and the nmos and Darlington parts of the spec_v2 boards.
fn library() -> Library {
    Library::load(&[root().join("tests/spec_v2/parts")]).expect("parts load")
}

#[test]
fn docs_hold_the_generated_schemas() {
    for kind in FileKind::ALL {
        let path = root().join("docs/schema").join(kind.file_name());
        if std::env::var_os(REGENERATE).is_some() {
            std::fs::create_dir_all(path.parent().expect("folder")).expect("mkdir");
            std::fs::write(&path, kind.text()).expect("write");
        }
        let copy = std::fs::read_to_string(&path).unwrap_or_default();
        assert!(
            copy == kind.text(),
            "docs/schema/{} is not what `pinlow schema {}` prints; regenerate it with `{REGENERATE}=1 cargo test --test schema`",
            kind.file_name(),
            kind.name()
        );
    }
}

#[test]
fn pinlow_schema_prints_each_schema() {
    for kind in FileKind::ALL {
        let out = Command::cargo_bin("pinlow")
            .expect("binary")
            .args(["schema", kind.name()])
            .output()
            .expect("run");
        assert!(out.status.success(), "{}", kind.name());
        assert_eq!(String::from_utf8_lossy(&out.stdout), kind.text());
        let schema: Value = serde_json::from_slice(&out.stdout).expect("JSON");
        assert_eq!(
            schema["$schema"],
            "https://json-schema.org/draft/2020-12/schema"
        );
    }
}

#[test]
fn every_board_and_part_file_of_the_repository_validates() {
    let boards = validator(FileKind::Board);
    let parts = validator(FileKind::Part);
    let mut seen = 0;
    for dir in [
        "examples",
        "tests/fixtures/boards",
        "tests/spec_v2/boards",
        "fuzz/corpus/board_file",
    ] {
        for file in json_files(dir) {
            let e = errors(&boards, &read_json(&file));
            assert!(e.is_empty(), "{}: {e:#?}", file.display());
            seen += 1;
        }
    }
    for dir in [
        "parts",
        "tests/fixtures/parts-dup",
        "tests/fixtures/parts-extra",
        "tests/spec_v2/parts",
        "fuzz/corpus/part_file",
    ] {
        for file in json_files(dir) {
            let e = errors(&parts, &read_json(&file));
            assert!(e.is_empty(), "{}: {e:#?}", file.display());
            seen += 1;
        }
    }
    assert!(seen > 60, "{seen} files");
}

/// Why a fixture is refused by the reader, and so what the schema does with it.
#[derive(Clone, Copy, Debug, PartialEq)]
enum Refused {
    /// An unknown key (or kind), a wrong type or a missing field: the schema refuses it too.
    Shape,
    /// A number outside its range: the schema states the range, and refuses it too.
    Range,
    /// A rule between fields or against the parts library, which the schema cannot state: it
    /// passes the schema.
    Beyond,
    /// Not JSON, or JSON nested deeper than the parser takes (serde_json's limit, the
    /// reader's too): the parser refuses it before any schema applies.
    Unparsed,
}

use Refused::*;

/// Every fixture of tests/fixtures/errors and tests/fixtures/parts-bad, read and classified.
const BAD_FIXTURES: &[(&str, Refused)] = &[
    ("errors/ambient-reversed.json", Beyond), // [85, -40]: minimum above maximum
    ("errors/ambient-too-cold.json", Range),  // -250 °C
    ("errors/deeply-nested.json", Unparsed),  // arrays 200 deep
    ("errors/defaults-name.json", Shape),     // `name` in defaults
    ("errors/grade-and-ambient.json", Shape), // both keys given (the schema says: not both)
    ("errors/huge-resistance.json", Range),   // 1e300 ohms
    ("errors/led-count-zero.json", Range),    // count 0
    ("errors/logic-min-above-high.json", Beyond), // 3.6 V guaranteed above 3.3 V nominal
    ("errors/malformed.json", Unparsed),      // a missing comma
    ("errors/missing-field.json", Shape),     // no supply_v, in the stage or the defaults
    ("errors/missing-stages.json", Shape),    // no `stages`
    ("errors/nan-value.json", Unparsed),      // NaN is not JSON
    ("errors/negative-value.json", Range),    // -0.05 A
    ("errors/no-stages.json", Shape),         // `stages` is empty
    ("errors/not-utf8.json", Unparsed),       // a byte that is not UTF-8
    ("errors/overdrive-below-one.json", Range), // overdrive 0.5
    ("errors/strip-zero-length.json", Range), // 0 m
    ("errors/tiny-current.json", Range),      // 1e-300 A
    ("errors/tolerance-one.json", Range),     // tolerance 1
    ("errors/unknown-key.json", Shape),       // supply_tolerence
    ("errors/unknown-load-key.json", Shape),  // coil_tolerence
    ("errors/unknown-load-kind.json", Shape), // kind "heater"
    ("errors/unknown-part.json", Beyond),     // no such part in the library
    ("errors/wrong-type.json", Shape),        // "12V" for supply_v
    ("errors/zero-resistor.json", Range),     // 0 ohms
    ("parts-bad/huge-gain.json", Range),      // hFE 1e300
    ("parts-bad/negative-rating.json", Range), // VCEO -40 V
    ("parts-bad/no-provenance.json", Shape),  // provenance missing
    ("parts-bad/polarity-pnp.json", Shape),   // polarity "pnp", not a drive kind
    ("parts-bad/unknown-key.json", Shape),    // vce_v in a gain point
    ("parts-bad/unsorted.json", Beyond),      // gain points out of order
    ("parts-bad/vbe-reversed.json", Beyond),  // VBE(sat) minimum above maximum
];

#[test]
fn fixtures_the_reader_refuses_for_their_shape_or_range_are_refused_by_the_schema() {
    let fixtures = root().join("tests/fixtures");
    let mut listed: Vec<&str> = BAD_FIXTURES.iter().map(|(f, _)| *f).collect();
    listed.sort_unstable();
    let mut present: Vec<String> = ["errors", "parts-bad"]
        .iter()
        .flat_map(|dir| {
            json_files(&format!("tests/fixtures/{dir}"))
                .into_iter()
                .map(move |p| format!("{dir}/{}", p.file_name().expect("name").to_string_lossy()))
        })
        .collect();
    present.sort_unstable();
    assert_eq!(
        listed, present,
        "classify every bad fixture in BAD_FIXTURES"
    );

    let lib = Library::builtin().expect("parts");
    let boards = validator(FileKind::Board);
    let parts = validator(FileKind::Part);
    for (name, why) in BAD_FIXTURES {
        let path = fixtures.join(name);
        let bytes = std::fs::read(&path).expect("read");
        let is_part = name.starts_with("parts-bad/");
        // The reader refuses every one of them.
        let read = match std::str::from_utf8(&bytes) {
            Err(_) => Err(()),
            Ok(text) if is_part => read_part(name, text, PartSource::File(path.clone()))
                .map(|_| ())
                .map_err(|_| ()),
            Ok(text) => parse_board(name, text, &lib).map(|_| ()).map_err(|_| ()),
        };
        assert!(read.is_err(), "{name}: the reader accepts it");
        let doc = serde_json::from_slice::<Value>(&bytes);
        if *why == Unparsed {
            assert!(doc.is_err(), "{name} parses as JSON");
            continue;
        }
        let doc = doc.unwrap_or_else(|e| panic!("{name}: {e}"));
        let v = if is_part { &parts } else { &boards };
        let valid = v.is_valid(&doc);
        match why {
            Shape | Range => assert!(!valid, "{name} ({why:?}) passes the schema"),
            Beyond => assert!(valid, "{name}: {:#?}", errors(v, &doc)),
            Unparsed => {}
        }
    }
}

#[test]
fn a_board_may_name_its_schema() {
    // `$schema` is accepted and ignored by the reader, and allowed by the schema.
    let text = r#"{"$schema": "../docs/schema/board.schema.json",
        "stages": [{"name": "K1", "part": "demo-npn-40v", "supply_v": 12, "logic_high_v": 3.3,
                    "load": {"kind": "current", "current_a": 0.1}}]}"#;
    let lib = Library::builtin().expect("parts");
    assert!(parse_board("b.json", text, &lib).is_ok());
    let doc: Value = serde_json::from_str(text).expect("json");
    assert!(validator(FileKind::Board).is_valid(&doc));
    let out = Command::cargo_bin("pinlow")
        .expect("binary")
        .args(["audit", "-", "--format", "json"])
        .write_stdin(text)
        .output()
        .expect("run");
    // A verdict (0 pass, 1 fail), not an input error (2).
    assert_ne!(
        out.status.code(),
        Some(2),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    let report: Value = serde_json::from_slice(&out.stdout).expect("a JSON report");
    assert_eq!(report["stages"][0]["name"], "K1");
}

// ---- probes: the schema and the reader agree at every edge ----

/// A board whose stages give every key, one stage per load kind (and an nmos stage).
fn full_board() -> Value {
    let common = json!({
        "supply_v": 12, "supply_tolerance": 0.05, "logic_high_v": 3.3, "logic_high_min_v": 2.9,
        "pin_limit_a": 0.008, "ambient_c": [-20, 60], "pull_down_ohms": 10000,
        "resistor_tolerance": 0.05, "resistor_rating_w": 0.25, "series": "E24"
    });
    let npn = |name: &str, load: Value, clamp: Value| {
        let mut s = common.clone();
        s["name"] = name.into();
        s["part"] = "demo-npn-40v".into();
        s["base_resistor_ohms"] = 1000.into();
        s["overdrive"] = 2.0.into();
        s["load"] = load;
        s["clamp"] = clamp;
        s
    };
    let mut nmos = common.clone();
    nmos["name"] = "M1".into();
    nmos["part"] = "spec2-nmos-ll".into();
    nmos["gate_resistor_ohms"] = 100.into();
    nmos["load"] = json!({"kind": "motor", "winding_ohms": 6.0, "winding_tolerance": 0.1, "inductance_h": 0.002});
    nmos["clamp"] = json!({"kind": "diode", "forward_v": 1.0, "reverse_v": 100, "current_a": 3.0});
    json!({
        "board": "probe",
        "defaults": {},
        "stages": [
            npn("K1", json!({"kind": "relay", "coil_ohms": 400, "coil_tolerance": 0.1, "rated_v": 12,
                             "must_operate_fraction": 0.75, "inductance_h": 0.2}),
                json!({"kind": "zener", "zener_v": 24, "forward_v": 1.0, "reverse_v": 100, "current_a": 1.0})),
            npn("D1", json!({"kind": "led", "count": 3, "forward_v": 3.0, "forward_min_v": 2.8,
                             "forward_max_v": 3.2, "current_a": 0.02, "max_current_a": 0.03,
                             "resistor_ohms": 150}), json!({"kind": "none"})),
            npn("S1", json!({"kind": "strip", "rated_v": 12, "current_per_m_a": 0.5, "length_m": 2}),
                json!({"kind": "none"})),
            npn("C1", json!({"kind": "current", "current_a": 0.15}), json!({"kind": "none"})),
            nmos
        ]
    })
}

/// Part files that give every key: a single NPN, a Darlington pair, an nmos part.
fn full_parts() -> Vec<Value> {
    let npn = json!({
        "id": "probe-npn", "description": "probe", "polarity": "npn", "package": "TO-92",
        "provenance": "test", "structure": "single", "vceo_max_v": 40, "ic_max_a": 0.2,
        "gain_min": [{"ic_a": 0.01, "hfe": 100}, {"ic_a": 0.1, "hfe": 30}],
        "gain_max": [{"ic_a": 0.01, "hfe": 300}, {"ic_a": 0.1, "hfe": 90}],
        "gain_temp_exponent": 1.5,
        "vce_sat_max": [{"ic_a": 0.01, "ib_a": 0.001, "v": 0.2}],
        "vbe_sat": [{"ic_a": 0.01, "ib_a": 0.001, "min_v": 0.65, "max_v": 0.85}],
        "icbo_max_a": 5e-8, "storage_time_s": 2e-7, "tj_max_c": 150, "r_th_ja_k_per_w": 200
    });
    let mut darlington = npn.clone();
    darlington["id"] = "probe-darlington".into();
    darlington["structure"] = "darlington".into();
    darlington["internal_base_emitter_ohms"] = 8000.into();
    let nmos = json!({
        "id": "probe-nmos", "description": "probe", "polarity": "nmos", "package": "SOT-23",
        "provenance": "test", "vds_max_v": 20, "id_max_a": 3.0, "vgs_max_v": 12,
        "vgs_th": {"min_v": 0.6, "max_v": 1.4},
        "rds_on_max": [{"vgs_v": 2.5, "ohms": 0.07, "id_a": 1.0}, {"vgs_v": 4.5, "ohms": 0.05}],
        "rds_on_tempco_per_k": 0.006, "vgs_th_tempco_v_per_k": -0.005, "igss_max_a": 1e-7,
        "tj_max_c": 150, "r_th_ja_k_per_w": 250
    });
    vec![npn, darlington, nmos]
}

/// One step of a path into a document.
#[derive(Clone, Debug)]
enum Step {
    Key(String),
    Index(usize),
}

/// The path as pinlow's messages write it (`stages[0].load.coil_ohms`).
fn shown(path: &[Step]) -> String {
    let mut s = String::new();
    for step in path {
        match step {
            Step::Key(k) if s.is_empty() => s.push_str(k),
            Step::Key(k) => {
                s.push('.');
                s.push_str(k);
            }
            Step::Index(i) => s.push_str(&format!("[{i}]")),
        }
    }
    s
}

fn at<'a>(doc: &'a mut Value, path: &[Step]) -> &'a mut Value {
    path.iter().fold(doc, |v, step| match step {
        Step::Key(k) => &mut v[k.as_str()],
        Step::Index(i) => &mut v[*i],
    })
}

/// A number the schema bounds, where the baseline document gives it.
#[derive(Debug)]
struct Bounded {
    path: Vec<Step>,
    /// (bound, exclusive)
    lo: Option<(f64, bool)>,
    hi: Option<(f64, bool)>,
    integer: bool,
}

/// Every bounded number of `doc` under `schema` (resolving `$ref` into `root`'s `$defs`, and
/// following the `oneOf` branch whose `kind` or `polarity` the document names). Also every
/// object the walk meets, for the key probes.
fn walk(
    root: &Value,
    schema: &Value,
    doc: &Value,
    path: Vec<Step>,
    out: &mut Vec<Bounded>,
    objects: &mut Vec<(Vec<Step>, Value)>,
) {
    let schema = match schema.get("$ref").and_then(Value::as_str) {
        Some(r) => &root["$defs"][r.trim_start_matches("#/$defs/")],
        None => schema,
    };
    for sub in schema["allOf"].as_array().into_iter().flatten() {
        walk(root, sub, doc, path.clone(), out, objects);
    }
    for branch in schema["oneOf"].as_array().into_iter().flatten() {
        let branch = match branch.get("$ref").and_then(Value::as_str) {
            Some(r) => &root["$defs"][r.trim_start_matches("#/$defs/")],
            None => branch,
        };
        let picks = ["kind", "polarity"].iter().any(|k| {
            branch["properties"][k]["const"].as_str().is_some()
                && branch["properties"][k]["const"] == doc[k]
        });
        if picks {
            walk(root, branch, doc, path.clone(), out, objects);
        }
    }
    if let Some(props) = schema["properties"].as_object() {
        if schema["additionalProperties"] == false {
            objects.push((path.clone(), schema.clone()));
        }
        for (key, sub) in props {
            if let Some(value) = doc.get(key) {
                let mut p = path.clone();
                p.push(Step::Key(key.clone()));
                walk(root, sub, value, p, out, objects);
            }
        }
    }
    if let (Some(items), Some(values)) = (schema.get("items"), doc.as_array()) {
        for (i, value) in values.iter().enumerate() {
            let mut p = path.clone();
            p.push(Step::Index(i));
            walk(root, items, value, p, out, objects);
        }
    }
    let bound = |inclusive: &str, exclusive: &str| {
        schema[inclusive]
            .as_f64()
            .map(|b| (b, false))
            .or_else(|| schema[exclusive].as_f64().map(|b| (b, true)))
    };
    let (lo, hi) = (
        bound("minimum", "exclusiveMinimum"),
        bound("maximum", "exclusiveMaximum"),
    );
    if doc.is_number() && (lo.is_some() || hi.is_some()) {
        out.push(Bounded {
            path,
            lo,
            hi,
            integer: schema["type"] == "integer",
        });
    }
}

/// A little past `b`, downwards or upwards.
fn past(b: f64, up: bool) -> f64 {
    let step = if b == 0.0 { 1e-9 } else { b.abs() * 1e-6 };
    if up {
        b + step
    } else {
        b - step
    }
}

/// The reader's verdict on a document: `Ok`, or its error.
type Verdict = Result<(), Box<Error>>;

/// Probe every bounded number of `doc`: a value at each inclusive bound and just inside each
/// exclusive one passes the schema, and the reader refuses it for no range at that path; a
/// value just outside each bound (and a fraction for a whole number) is refused by both, the
/// reader with a range error at that path.
fn probe(kind: FileKind, doc: &Value, read: &dyn Fn(&Value) -> Verdict) -> usize {
    let v = validator(kind);
    let schema = kind.schema();
    assert!(v.is_valid(doc), "baseline: {:#?}", errors(&v, doc));
    assert!(read(doc).is_ok(), "baseline: {:?}", read(doc).err());
    let mut bounded = Vec::new();
    walk(
        &schema,
        &schema,
        doc,
        Vec::new(),
        &mut bounded,
        &mut Vec::new(),
    );
    for b in &bounded {
        // A number in an array of numbers (ambient_c) is named by the array.
        let reader_path = match b.path.last() {
            Some(Step::Index(_)) => shown(&b.path[..b.path.len() - 1]),
            _ => shown(&b.path),
        };
        let range_at = |verdict: &Verdict| match verdict {
            Err(e) if matches!(**e, Error::Range { .. }) => {
                e.to_string().contains(&format!("{reader_path}: "))
            }
            _ => false,
        };
        let mut values: Vec<(f64, bool)> = Vec::new(); // (value, inside)
        for (bound, up) in [(b.lo, false), (b.hi, true)] {
            let Some((edge, exclusive)) = bound else {
                continue;
            };
            if exclusive {
                values.push((edge, false));
                values.push((past(edge, !up), true));
            } else {
                values.push((edge, true));
                values.push((past(edge, up), false));
            }
        }
        if b.integer {
            values.push((2.5, false));
        }
        for (x, inside) in values {
            let mut d = doc.clone();
            *at(&mut d, &b.path) = json!(x);
            let verdict = read(&d);
            let at_path = shown(&b.path);
            if inside {
                assert!(v.is_valid(&d), "{at_path} = {x}: {:#?}", errors(&v, &d));
                assert!(!range_at(&verdict), "{at_path} = {x}: {:?}", verdict.err());
            } else {
                assert!(!v.is_valid(&d), "{at_path} = {x} passes the schema");
                // The nmos reader checks the order of the RDS(on) points before their ranges.
                let unsorted =
                    matches!(&verdict, Err(e) if e.to_string().contains("points must be sorted"));
                assert!(
                    range_at(&verdict) || unsorted,
                    "{at_path} = {x}: the reader says {:?}",
                    verdict.err().map(|e| e.to_string())
                );
            }
        }
    }
    bounded.len()
}

/// Every object of `doc` the schema closes: an unknown key is refused by both; each key set to
/// `null` is refused by both unless the reader gives `null` a meaning; each key left out is
/// refused by the schema exactly when the reader needs it.
fn probe_keys(kind: FileKind, doc: &Value, read: &dyn Fn(&Value) -> Verdict) -> usize {
    let v = validator(kind);
    let schema = kind.schema();
    let mut objects = Vec::new();
    walk(
        &schema,
        &schema,
        doc,
        Vec::new(),
        &mut Vec::new(),
        &mut objects,
    );
    let mut probes = 0;
    for (path, _) in &objects {
        let mut d = doc.clone();
        at(&mut d, path)["typo_key"] = json!(1);
        assert!(
            !v.is_valid(&d),
            "{}.typo_key passes the schema",
            shown(path)
        );
        assert!(
            read(&d).is_err(),
            "{}.typo_key passes the reader",
            shown(path)
        );
        let mut here = doc.clone();
        let keys: Vec<String> = at(&mut here, path)
            .as_object()
            .map(|o| o.keys().cloned().collect())
            .unwrap_or_default();
        for key in keys {
            let mut p = path.clone();
            p.push(Step::Key(key.clone()));
            let name = shown(&p);
            let mut nulled = doc.clone();
            *at(&mut nulled, &p) = Value::Null;
            assert_eq!(
                v.is_valid(&nulled),
                read(&nulled).is_ok(),
                "{name} = null: schema and reader differ ({:?})",
                read(&nulled).err().map(|e| e.to_string())
            );
            let mut removed = doc.clone();
            if let Some(obj) = at(&mut removed, path).as_object_mut() {
                obj.remove(&key);
            }
            // Without `structure` a Darlington pair's internal resistor is refused: a rule
            // between two keys, which the schema does not state.
            if key == "structure" && doc["internal_base_emitter_ohms"].is_number() {
                continue;
            }
            assert_eq!(
                v.is_valid(&removed),
                read(&removed).is_ok(),
                "{name} left out: schema and reader differ ({:?})",
                read(&removed).err().map(|e| e.to_string())
            );
            probes += 1;
        }
    }
    probes
}

fn read_board_doc(lib: &Library) -> impl Fn(&Value) -> Verdict + '_ {
    |doc: &Value| {
        parse_board("probe.json", &doc.to_string(), lib)
            .map(|_| ())
            .map_err(Box::new)
    }
}

fn read_part_doc(doc: &Value) -> Verdict {
    read_part(
        "probe.json",
        &doc.to_string(),
        PartSource::File("probe.json".into()),
    )
    .map(|_| ())
    .map_err(Box::new)
}

#[test]
fn the_board_schema_and_the_reader_agree_at_every_range_edge() {
    let lib = library();
    let n = probe(FileKind::Board, &full_board(), &read_board_doc(&lib));
    // Stage fields, both ambient ends, and the fields of every load and clamp kind.
    assert!(n > 60, "{n} bounded numbers probed");
}

#[test]
fn the_part_schema_and_the_reader_agree_at_every_range_edge() {
    let mut n = 0;
    for doc in full_parts() {
        n += probe(FileKind::Part, &doc, &read_part_doc);
    }
    assert!(n > 50, "{n} bounded numbers probed");
}

#[test]
fn the_board_schema_and_the_reader_agree_on_unknown_null_and_missing_keys() {
    let lib = library();
    let n = probe_keys(FileKind::Board, &full_board(), &read_board_doc(&lib));
    assert!(n > 80, "{n} keys probed");
    // A key a stage needs may stand in the defaults instead.
    let v = validator(FileKind::Board);
    let read = read_board_doc(&lib);
    let mut board = full_board();
    for key in pinlow::board::NEEDED_KEYS {
        let value = board["stages"][0][*key].take();
        board["stages"][0]
            .as_object_mut()
            .expect("stage")
            .remove(*key);
        assert!(
            !v.is_valid(&board) && read(&board).is_err(),
            "{key} missing"
        );
        board["defaults"][*key] = value;
        assert!(
            v.is_valid(&board),
            "{key} in defaults: {:#?}",
            errors(&v, &board)
        );
        assert!(
            read(&board).is_ok(),
            "{key} in defaults: {:?}",
            read(&board).err()
        );
    }
}

#[test]
fn the_part_schema_and_the_reader_agree_on_unknown_null_and_missing_keys() {
    let mut n = 0;
    for doc in full_parts() {
        n += probe_keys(FileKind::Part, &doc, &read_part_doc);
    }
    assert!(n > 40, "{n} keys probed");
}
