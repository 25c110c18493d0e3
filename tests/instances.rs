//! Every public benchmark file in ../shared/instances (gdb, val, egl) is read,
//! and checked against its own header, read here by a separate, simple parser:
//! VERTICES, ARISTAS_REQ, ARISTAS_NOREQ and COSTE_TOTAL_REQ.

mod common;

use std::collections::BTreeSet;
use std::path::{Path, PathBuf};

use arcwright::io::read_dat_file;

fn shared() -> Option<PathBuf> {
    common::shared_dir("instances")
}

fn files(root: &Path) -> Vec<PathBuf> {
    let mut v = Vec::new();
    for set in ["gdb", "val", "egl"] {
        for e in std::fs::read_dir(root.join(set)).unwrap() {
            let p = e.unwrap().path();
            if p.extension().is_some_and(|x| x == "dat") {
                v.push(p);
            }
        }
    }
    v.sort();
    v
}

/// The header figure after `KEY :`, found independently of the crate.
fn header(text: &str, key: &str) -> i64 {
    for line in text.lines() {
        let mut parts = line.splitn(2, ':');
        let k = parts.next().unwrap().trim();
        if k == key {
            return parts.next().unwrap().trim().parse().unwrap();
        }
    }
    panic!("no {key}");
}

/// Sum of the `coste` figures of the required-edge lines, found independently.
fn listed_required_cost(text: &str) -> i64 {
    let mut in_req = false;
    let mut sum = 0;
    for line in text.lines() {
        let t = line.trim();
        if t.starts_with("LISTA_ARISTAS_REQ") {
            in_req = true;
        } else if t.starts_with("LISTA_ARISTAS_NOREQ") || t.starts_with("DEPOSITO") {
            in_req = false;
        } else if in_req && t.starts_with('(') {
            let words: Vec<&str> = t.split_whitespace().collect();
            let i = words.iter().position(|w| *w == "coste").unwrap();
            sum += words[i + 1].parse::<i64>().unwrap();
        }
    }
    sum
}

#[test]
fn all_public_instances_parse_and_match_their_headers() {
    let Some(root) = shared() else { return };
    let files = files(&root);
    assert_eq!(files.len(), 81, "23 gdb + 34 val + 24 egl files expected");
    let mut differs = BTreeSet::new();
    for f in &files {
        let text = std::fs::read_to_string(f).unwrap();
        let d = read_dat_file(f).unwrap_or_else(|e| panic!("{e}"));
        let inst = &d.instance;
        let name = f.file_stem().unwrap().to_string_lossy().into_owned();
        assert_eq!(
            inst.network().junctions.len() as i64,
            header(&text, "VERTICES"),
            "{name}"
        );
        assert_eq!(
            inst.tasks().len() as i64,
            header(&text, "ARISTAS_REQ"),
            "{name}"
        );
        assert_eq!(
            inst.network().links.len() as i64,
            header(&text, "ARISTAS_REQ") + header(&text, "ARISTAS_NOREQ"),
            "{name}"
        );
        let listed = listed_required_cost(&text);
        assert_eq!(inst.total_service_cost(), listed, "{name}");
        assert_eq!(d.required_cost, listed, "{name}");
        let head = header(&text, "COSTE_TOTAL_REQ");
        assert_eq!(d.checksum, Some(head), "{name}");
        if head != listed {
            println!("{name}: COSTE_TOTAL_REQ {head}, listed required costs add up to {listed}");
            differs.insert(name);
        }
    }
    // The measured discrepancy in the distributed files: every val file and gdb12.
    let mut expected: BTreeSet<String> = files
        .iter()
        .filter(|f| f.parent().unwrap().ends_with("val"))
        .map(|f| f.file_stem().unwrap().to_string_lossy().into_owned())
        .collect();
    assert_eq!(expected.len(), 34);
    expected.insert("gdb12".to_string());
    println!(
        "{} files whose COSTE_TOTAL_REQ differs from the listed sum: {:?}",
        differs.len(),
        differs
    );
    assert_eq!(differs, expected);
}
