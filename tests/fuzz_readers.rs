//! Random and mutated text fed to both readers: they may reject it, but
//! must never panic.

use std::path::Path;

use arcwright::io::{read_dat, read_scenario};
use proptest::prelude::*;

fn seed(name: &str) -> String {
    std::fs::read_to_string(
        Path::new(env!("CARGO_MANIFEST_DIR"))
            .join("tests/fixtures")
            .join(name),
    )
    .unwrap()
}

/// Characters that matter to the two formats, plus some that do not.
const ALPHABET: &[u8] = b"0123456789-+.:,()[]{}\"\\ \t\r\nabcdeEfnrstuloVIDX_";

#[derive(Clone, Debug)]
enum Edit {
    Replace(usize, u8),
    Insert(usize, u8),
    Delete(usize),
    Truncate(usize),
    Duplicate(usize, usize),
}

fn edit() -> impl Strategy<Value = Edit> {
    let ch = (0..ALPHABET.len()).prop_map(|i| ALPHABET[i]);
    prop_oneof![
        (any::<usize>(), ch.clone()).prop_map(|(p, c)| Edit::Replace(p, c)),
        (any::<usize>(), ch).prop_map(|(p, c)| Edit::Insert(p, c)),
        any::<usize>().prop_map(Edit::Delete),
        any::<usize>().prop_map(Edit::Truncate),
        (any::<usize>(), 1..40usize).prop_map(|(p, l)| Edit::Duplicate(p, l)),
    ]
}

fn apply(text: &str, edits: &[Edit]) -> String {
    let mut b = text.as_bytes().to_vec();
    for e in edits {
        let n = b.len().max(1);
        match *e {
            Edit::Replace(p, c) if !b.is_empty() => b[p % n] = c,
            Edit::Insert(p, c) => b.insert(p % (b.len() + 1), c),
            Edit::Delete(p) if !b.is_empty() => {
                b.remove(p % n);
            }
            Edit::Truncate(p) => b.truncate(p % (b.len() + 1)),
            Edit::Duplicate(p, l) if !b.is_empty() => {
                let s = p % n;
                let piece: Vec<u8> = b[s..(s + l).min(b.len())].to_vec();
                b.splice(s..s, piece);
            }
            _ => {}
        }
    }
    String::from_utf8_lossy(&b).into_owned()
}

/// Big numbers in number positions (overflow, allocation by header counts).
fn big_numbers(text: &str, pick: usize) -> String {
    let bigs = [
        "9223372036854775807",
        "99999999999999999999",
        "-9223372036854775808",
        "4294967296",
        "1e9",
    ];
    let mut out = String::new();
    let mut k = 0;
    let mut in_num = false;
    for c in text.chars() {
        if c.is_ascii_digit() {
            if !in_num {
                k += 1;
                if k % 7 == pick % 7 {
                    out.push_str(bigs[pick % bigs.len()]);
                }
            }
            in_num = true;
        } else {
            in_num = false;
        }
        out.push(c);
    }
    out
}

proptest! {
    #![proptest_config(ProptestConfig { cases: 400, ..ProptestConfig::default() })]

    #[test]
    fn dat_reader_never_panics(edits in prop::collection::vec(edit(), 1..8), pick in 0..70usize) {
        let base = seed("tiny.dat");
        let _ = read_dat(&apply(&base, &edits), "fuzz.dat");
        let _ = read_dat(&big_numbers(&base, pick), "fuzz.dat");
    }

    #[test]
    fn scenario_reader_never_panics(edits in prop::collection::vec(edit(), 1..8), pick in 0..70usize) {
        let base = seed("tiny.json");
        let _ = read_scenario(&apply(&base, &edits), "fuzz.json");
        let _ = read_scenario(&big_numbers(&base, pick), "fuzz.json");
    }

    #[test]
    fn random_text_never_panics(bytes in prop::collection::vec(0..ALPHABET.len(), 0..300)) {
        let text: String = bytes.iter().map(|&i| ALPHABET[i] as char).collect();
        let _ = read_dat(&text, "random.dat");
        let _ = read_scenario(&text, "random.json");
        let _ = read_dat(&format!(" VERTICES : 3\n ARISTAS_REQ : 1\n CAPACIDAD : 5\n{text}"), "random.dat");
    }
}
