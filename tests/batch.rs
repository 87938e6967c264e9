//! `frostline batch` and its merge: a list of cases run each like `frostline run`; sharded (one
//! shard by flag, one by Slurm array variables) and merged equals unsharded; a case the rules
//! refuse is recorded and the others go on; the list is checked.
use crate::cli::{bin, scratch};
use crate::common::read_json;
use std::path::Path;

/// `frostline batch LIST --out OUT --mesh coarse --no-plots --quiet` plus `extra`, with
/// environment `env`: (exit code, stdout, stderr).
fn batch(list: &Path, out: &Path, extra: &[&str], env: &[(&str, &str)]) -> (i32, String, String) {
    let mut c = bin();
    c.args([
        "batch".as_ref(),
        list.as_os_str(),
        "--out".as_ref(),
        out.as_os_str(),
    ])
    .args(["--mesh", "coarse", "--no-plots", "--quiet"])
    .args(extra);
    for (k, v) in env {
        c.env(k, v);
    }
    let o = c.output().unwrap();
    (
        o.status.code().unwrap_or(-1),
        String::from_utf8_lossy(&o.stdout).into_owned(),
        String::from_utf8_lossy(&o.stderr).into_owned(),
    )
}

/// batch.csv without its wall-time column.
fn table(dir: &Path) -> String {
    let text = std::fs::read_to_string(dir.join("batch.csv")).unwrap();
    let t = text
        .lines()
        .next()
        .unwrap()
        .split(',')
        .position(|h| h == "run_s")
        .unwrap();
    text.lines()
        .map(|l| {
            let mut f: Vec<&str> = l.split(',').collect();
            f.remove(t);
            f.join(",")
        })
        .collect::<Vec<_>>()
        .join("\n")
}

/// Four cases (a heated house, an unheated storehouse, a case the rules refuse, one whose run
/// fails: frost to the bottom of its domain), listed with a byte-order mark: the batch
/// writes a row per case and each case's full results; a row's figures equal its directory's
/// summary.json to the last digit; the refused and failed cases are recorded (the failed one
/// leaves no results) and the batch exits 3 (a case
/// did not run); shards 1/2 (flag) and 2/2 (Slurm variables) merged give the same batch.csv (run
/// times aside) and the same case files as the unsharded batch.
#[test]
fn batch_sharded_and_merged_equals_unsharded() {
    let dir = scratch("batch");
    let root = Path::new(env!("CARGO_MANIFEST_DIR"));
    let bad = std::fs::read_to_string(root.join("examples/kettle-hollow-house.toml"))
        .unwrap()
        .replace("width_m = 0.40", "width_m = 0.10");
    std::fs::write(dir.join("narrow.toml"), &bad).unwrap();
    // A case whose run stops on its own terms: frost down to the bottom of a 2 m deep domain.
    let shallow = bad
        .replace("width_m = 0.10", "width_m = 0.40")
        .replace("[simulation]", "[simulation]\ndomain_depth_m = 2.0");
    // First a run in which it succeeds (the default 10 m deep domain), then the failing one.
    std::fs::write(
        dir.join("shallow.toml"),
        shallow.replace("domain_depth_m = 2.0", ""),
    )
    .unwrap();
    let list = dir.join("sites.txt");
    // With a byte-order mark, as some editors write.
    std::fs::write(
        &list,
        format!(
            "\u{feff}# four invented sites\n{}\n\n{}   # unheated\nnarrow.toml\nshallow.toml\n",
            root.join("examples/kettle-hollow-house.toml").display(),
            root.join("examples/sedge-point-storehouse.toml").display()
        ),
    )
    .unwrap();
    let whole = dir.join("whole");
    batch(&list, &whole, &[], &[]);
    assert!(whole.join("cases/004-shallow/summary.json").exists());
    std::fs::write(dir.join("shallow.toml"), shallow).unwrap();
    let (code, stdout, _) = batch(&list, &whole, &[], &[]);
    assert_eq!(code, 3, "{stdout}");
    assert!(stdout.contains("Caution:"));
    let rows = table(&whole);
    let lines: Vec<&str> = rows.lines().collect();
    assert_eq!(lines.len(), 5, "{rows}");
    assert!(lines[4].contains(",failed,"), "{}", lines[4]);
    // A failed case leaves no results behind (not even of an earlier run into the same place).
    assert!(!whole.join("cases/004-shallow/summary.json").exists());
    assert!(
        lines[1].contains(",cases/001-kettle-hollow-house,ok,"),
        "{}",
        lines[1]
    );
    assert!(lines[3].contains(",refused,"), "{}", lines[3]);
    assert!(lines[3].contains("narrower than the wall"), "{}", lines[3]);
    let s = read_json(&whole.join("cases/001-kettle-hollow-house/summary.json"));
    let f: Vec<&str> = lines[1].split(',').collect();
    let head: Vec<&str> = lines[0].split(',').collect();
    for k in ["frost_margin_m", "annual_heat_loss_kwh", "peak_heat_loss_w"] {
        let v: f64 = f[head.iter().position(|h| *h == k).unwrap()]
            .parse()
            .unwrap();
        assert_eq!(v, s[k].as_f64().unwrap(), "{k}");
    }

    let parts = dir.join("parts");
    assert_eq!(batch(&list, &parts, &["--shard", "1/2"], &[]).0, 3);
    let slurm = [
        ("SLURM_ARRAY_TASK_ID", "2"),
        ("SLURM_ARRAY_TASK_MIN", "1"),
        ("SLURM_ARRAY_TASK_COUNT", "2"),
    ];
    assert_eq!(batch(&list, &parts, &[], &slurm).0, 3);
    let merged = dir.join("merged");
    let o = bin()
        .arg("merge")
        .arg(parts.join("shard-1-of-2"))
        .arg(parts.join("shard-2-of-2"))
        .arg("--out")
        .arg(&merged)
        .output()
        .unwrap();
    assert_eq!(
        o.status.code(),
        Some(3),
        "{}",
        String::from_utf8_lossy(&o.stderr)
    );
    assert_eq!(table(&merged), rows);
    for case in ["001-kettle-hollow-house", "002-sedge-point-storehouse"] {
        for f in ["daily.csv", "monthly.csv", "section.json"] {
            let p = format!("cases/{case}/{f}");
            assert_eq!(
                std::fs::read(merged.join(&p)).unwrap(),
                std::fs::read(whole.join(&p)).unwrap(),
                "{p}"
            );
        }
    }
    let b = read_json(&merged.join("batch.json"));
    assert_eq!(
        (
            b["cases_run"].as_u64(),
            b["cases_ok"].as_u64(),
            b["cases_not_run"].as_u64()
        ),
        (Some(2), Some(2), Some(2))
    );

    // A merge with a shard missing is refused.
    let o = bin()
        .arg("merge")
        .arg(parts.join("shard-1-of-2"))
        .arg("--out")
        .arg(dir.join("half"))
        .output()
        .unwrap();
    assert_eq!(o.status.code(), Some(2));
    assert!(String::from_utf8_lossy(&o.stderr).contains("shards [2] of 2 missing"));
}

/// A list naming a file that does not exist is refused with the list's line; an empty list is
/// refused.
#[test]
fn batch_list_is_checked() {
    let dir = scratch("batch-list");
    let list = dir.join("sites.txt");
    std::fs::write(&list, "# none yet\n\nnowhere.toml\n").unwrap();
    let (code, _, e) = batch(&list, &dir.join("out"), &[], &[]);
    assert_eq!(code, 2);
    assert!(
        e.contains("sites.txt")
            && e.contains("line 3")
            && e.contains("\"nowhere.toml\" is not a file"),
        "{e}"
    );
    std::fs::write(&list, "# nothing\n").unwrap();
    let (code, _, e) = batch(&list, &dir.join("out"), &[], &[]);
    assert_eq!(code, 2);
    assert!(e.contains("0 case files listed"), "{e}");
}
