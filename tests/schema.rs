//! The JSON Schema of the case file (`docs/case.schema.json`, for editors): every bundled example
//! validates against it, a misspelt key or a wrong type does not, and it names every key the
//! parser accepts (the fields of `src/case/raw.rs`, which denies unknown keys). The validator is
//! the subset of JSON Schema 2020-12 the schema uses (type, properties, additionalProperties,
//! required, items, enum, oneOf, allOf, $ref into $defs, minItems, maxItems). Every quantity key
//! comes with its US-unit variants (`thickness_in`, `thickness_ft` beside `thickness_m`), a
//! required one as "exactly one of them".
use serde_json::Value;

fn schema() -> Value {
    let p = std::path::Path::new(env!("CARGO_MANIFEST_DIR")).join("docs/case.schema.json");
    serde_json::from_str(&std::fs::read_to_string(p).unwrap()).unwrap()
}

/// Errors of `v` against schema node `s` (root `root` for references), with JSON paths.
fn check(root: &Value, s: &Value, v: &Value, path: &str, errs: &mut Vec<String>) {
    if let Some(r) = s.get("$ref").and_then(Value::as_str) {
        let name = r.strip_prefix("#/$defs/").expect("local reference");
        return check(root, &root["$defs"][name], v, path, errs);
    }
    for a in s
        .get("allOf")
        .and_then(Value::as_array)
        .into_iter()
        .flatten()
    {
        check(root, a, v, path, errs);
    }
    if let Some(alts) = s.get("oneOf").and_then(Value::as_array) {
        let ok = alts
            .iter()
            .filter(|a| {
                let mut e = Vec::new();
                check(root, a, v, path, &mut e);
                e.is_empty()
            })
            .count();
        if ok != 1 {
            errs.push(format!("{path}: matches {ok} of the alternatives"));
        }
        return;
    }
    if let Some(t) = s.get("type").and_then(Value::as_str) {
        let fits = match t {
            "object" => v.is_object(),
            "array" => v.is_array(),
            "number" => v.is_number(),
            "integer" => v.is_i64() || v.is_u64(),
            "string" => v.is_string(),
            "boolean" => v.is_boolean(),
            _ => false,
        };
        if !fits {
            errs.push(format!("{path}: not {t}"));
            return;
        }
    }
    if let Some(e) = s.get("enum").and_then(Value::as_array) {
        if !e.contains(v) {
            errs.push(format!("{path}: {v} not one of {e:?}"));
        }
    }
    if let Some(o) = v.as_object() {
        let props = s.get("properties").and_then(Value::as_object);
        for r in s
            .get("required")
            .and_then(Value::as_array)
            .into_iter()
            .flatten()
        {
            if !o.contains_key(r.as_str().unwrap()) {
                errs.push(format!("{path}: missing {r}"));
            }
        }
        for (k, x) in o {
            match props.and_then(|p| p.get(k)) {
                Some(ps) => check(root, ps, x, &format!("{path}.{k}"), errs),
                None => match s.get("additionalProperties") {
                    Some(Value::Bool(false)) => errs.push(format!("{path}: unknown key {k}")),
                    Some(ap) if ap.is_object() => check(root, ap, x, &format!("{path}.{k}"), errs),
                    _ => {}
                },
            }
        }
    }
    if let Some(a) = v.as_array() {
        let n = a.len() as u64;
        if s.get("minItems")
            .and_then(Value::as_u64)
            .is_some_and(|m| n < m)
            || s.get("maxItems")
                .and_then(Value::as_u64)
                .is_some_and(|m| n > m)
        {
            errs.push(format!("{path}: {n} items"));
        }
        if let Some(items) = s.get("items") {
            for (k, x) in a.iter().enumerate() {
                check(root, items, x, &format!("{path}[{k}]"), errs);
            }
        }
    }
}

fn errors_of(toml_text: &str) -> Vec<String> {
    let t: toml::Value = toml::from_str(toml_text).unwrap();
    let v = serde_json::to_value(t).unwrap();
    let root = schema();
    let mut errs = Vec::new();
    check(&root, &root, &v, "$", &mut errs);
    errs
}

#[test]
fn every_example_validates_and_mistakes_do_not() {
    let dir = std::path::Path::new(env!("CARGO_MANIFEST_DIR")).join("examples");
    let mut n = 0;
    for e in std::fs::read_dir(dir).unwrap() {
        let p = e.unwrap().path();
        if p.extension().is_some_and(|x| x == "toml") {
            let text = std::fs::read_to_string(&p).unwrap();
            let errs = errors_of(&text);
            assert!(errs.is_empty(), "{}: {errs:?}", p.display());
            n += 1;
        }
    }
    assert!(n >= 6, "{n} examples");
    let demo = std::fs::read_to_string(
        std::path::Path::new(env!("CARGO_MANIFEST_DIR")).join("examples/kettle-hollow-house.toml"),
    )
    .unwrap();
    let misspelt = demo.replace("[footing]\n", "[footing]\nbase_dept_m = 0.5\n");
    assert!(errors_of(&misspelt)
        .iter()
        .any(|e| e.contains("unknown key base_dept_m")));
    let wrong_type = demo.replace(
        "[footing]\n",
        "[footing]\nprotected_zone_angle_deg = \"steep\"\n",
    );
    assert!(errors_of(&wrong_type)
        .iter()
        .any(|e| e.contains("$.footing.protected_zone_angle_deg: not number")));
}

/// The schema names exactly the keys of the parser's raw structs and, for each quantity key, its
/// US-unit variants (each maps back to its SI key by the parser's own units table).
#[test]
fn schema_names_every_key_the_parser_accepts() {
    let raw = std::fs::read_to_string(
        std::path::Path::new(env!("CARGO_MANIFEST_DIR")).join("src/case/raw.rs"),
    )
    .unwrap();
    let mut fields: Vec<String> = raw
        .lines()
        .filter_map(|l| l.trim().strip_prefix("pub "))
        .filter(|l| !l.starts_with("struct") && !l.starts_with("enum") && !l.starts_with("type"))
        .filter_map(|l| l.split_once(':').map(|(k, _)| k.to_string()))
        .collect();
    // A serde alias (`#[serde(alias = "min_m")]`) is a key the parser accepts too.
    fields.extend(raw.lines().filter_map(|l| {
        let rest = l.trim().strip_prefix("#[serde(alias = \"")?;
        Some(rest.split('"').next()?.to_string())
    }));
    let root = schema();
    let keys: Vec<String> = std::iter::once(&root)
        .chain(root["$defs"].as_object().unwrap().values())
        .flat_map(|d| {
            d.get("properties")
                .and_then(Value::as_object)
                .into_iter()
                .flat_map(|p| p.keys().cloned())
        })
        .collect();
    let (us, mut si): (Vec<String>, Vec<String>) = keys
        .into_iter()
        .partition(|k| frostline::case::units::us_key(k).is_some_and(|(_, s)| fields.contains(&s)));
    for k in &us {
        let (_, s) = frostline::case::units::us_key(k).unwrap();
        assert!(si.contains(&s), "{k}: no {s}");
    }
    assert!(us.len() > 80, "{} US keys", us.len());
    fields.sort();
    si.sort();
    assert_eq!(fields, si);
}

/// The README's library example is the crate documentation's doc test (which `cargo test` runs),
/// without its hidden `# ` lines: the copy a reader sees is the code that is tested.
#[test]
fn readme_library_example_is_the_tested_one() {
    let root = std::path::Path::new(env!("CARGO_MANIFEST_DIR"));
    let readme = std::fs::read_to_string(root.join("README.md")).unwrap();
    let lib = std::fs::read_to_string(root.join("src/lib.rs")).unwrap();
    let block = |text: &str, open: &str, close: &str| -> Vec<String> {
        text.lines()
            .skip_while(|l| l.trim() != open)
            .skip(1)
            .take_while(|l| l.trim() != close)
            .map(|l| l.to_string())
            .collect()
    };
    let doc: Vec<String> = lib
        .lines()
        .filter_map(|l| l.strip_prefix("//!"))
        .map(|l| l.strip_prefix(' ').unwrap_or(l).to_string())
        .collect::<Vec<_>>()
        .join("\n")
        .lines()
        .skip_while(|l| l.trim() != "```")
        .skip(1)
        .take_while(|l| l.trim() != "```")
        .filter(|l| !l.starts_with("# "))
        .map(|l| l.to_string())
        .collect();
    let shown = block(&readme, "```rust", "```");
    assert!(!doc.is_empty());
    assert_eq!(shown, doc);
}
