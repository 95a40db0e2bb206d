//! Replays every saved fuzz input (tests/data/fuzz-regressions/<target>/*: inputs that once
//! crashed a target, plus the seed corpus in fuzz/corpus/<target>/) through the same target
//! functions the fuzzer runs, so a fixed crash stays fixed under plain `cargo test`.

use std::path::Path;
use stillsky_tests::fuzz_targets::TARGETS;

fn replay(dir: &Path, target: fn(&[u8])) -> usize {
    let Ok(entries) = std::fs::read_dir(dir) else { return 0 };
    let mut files: Vec<_> = entries
        .filter_map(|e| e.ok().map(|e| e.path()))
        .filter(|p| p.is_file() && !p.file_name().is_some_and(|n| n.to_string_lossy().starts_with('.')))
        .collect();
    files.sort();
    for f in &files {
        let data = std::fs::read(f).unwrap();
        let r = std::panic::catch_unwind(|| target(&data));
        assert!(r.is_ok(), "{} fails its target again", f.display());
    }
    files.len()
}

#[test]
fn saved_fuzz_inputs_pass_their_targets() {
    let root = Path::new(env!("CARGO_MANIFEST_DIR"));
    let mut counts = Vec::new();
    for (name, target) in TARGETS {
        let regressions = replay(&root.join("data/fuzz-regressions").join(name), target);
        let seeds = replay(&root.join("../fuzz/corpus").join(name), target);
        assert!(seeds > 0, "no seed corpus for {name}");
        counts.push(format!("{name}: {regressions} regressions, {seeds} seeds"));
    }
    println!("{}", counts.join("\n"));
}
