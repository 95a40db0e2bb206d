//! Atomic whole-file writes and the row-atomic CSV writer used for batch output and resume.

use std::collections::HashSet;
use std::io::Write;
use std::path::PathBuf;

use stillsky::Error;
use stillsky::io::atomic::{AtomicCsvWriter, completed_keys, partial_path, write_atomic};

fn dir(name: &str) -> PathBuf {
    let d = PathBuf::from(env!("CARGO_TARGET_TMPDIR")).join("atomic").join(name);
    let _ = std::fs::remove_dir_all(&d);
    std::fs::create_dir_all(&d).unwrap();
    d
}

fn set(keys: &[&str]) -> HashSet<String> {
    keys.iter().map(|s| s.to_string()).collect()
}

#[test]
fn write_atomic_replaces_and_leaves_no_temporary() {
    let d = dir("whole");
    let p = d.join("out.toml");
    std::fs::write(&p, "old").unwrap();
    write_atomic(&p, b"new content").unwrap();
    assert_eq!(std::fs::read(&p).unwrap(), b"new content");
    let names: Vec<_> = std::fs::read_dir(&d).unwrap().map(|e| e.unwrap().file_name()).collect();
    assert_eq!(names, ["out.toml"]);
    // Into a missing directory: an Io error naming the path, and nothing created.
    match write_atomic(d.join("no/such/dir/x"), b"1") {
        Err(Error::Io { path, .. }) => assert!(path.contains("no/such/dir"), "{path}"),
        other => panic!("{other:?}"),
    }
}

#[test]
fn interrupted_writer_leaves_only_complete_rows_and_resume_continues() {
    let d = dir("rows");
    let out = d.join("sweep.csv");
    let header = ["case", "rms_px", "note"];
    let mut w = AtomicCsvWriter::create(&out, &header).unwrap();
    w.write_row(&["a", "0.31", "plain"]).unwrap();
    w.write_row(&["b", "0.42", "has, comma"]).unwrap();
    w.write_row(&["c", "0.50", ""]).unwrap();
    assert_eq!(w.rows(), 3);
    drop(w); // interrupted run: no finish()

    assert!(!out.exists(), "the final name appears only on finish()");
    let partial = partial_path(&out);
    let text = std::fs::read_to_string(&partial).unwrap();
    assert!(text.ends_with('\n'), "ends with a complete row: {text:?}");
    assert_eq!(text, "case,rms_px,note\na,0.31,plain\nb,0.42,\"has, comma\"\nc,0.50,\n");
    assert_eq!(completed_keys(&out, "case").unwrap(), set(&["a", "b", "c"]));

    // A torn last line (machine died mid-write) is ignored by the resume reader...
    std::fs::OpenOptions::new().append(true).open(&partial).unwrap().write_all(b"d,0.6").unwrap();
    assert_eq!(completed_keys(&out, "case").unwrap(), set(&["a", "b", "c"]));
    // ...and dropped when the writer resumes.
    let mut w = AtomicCsvWriter::resume(&out, &header).unwrap();
    assert_eq!(w.rows(), 3);
    w.write_row(&["d", "0.61", "again"]).unwrap();
    let fin = w.finish().unwrap();
    assert_eq!(fin, out);
    assert!(!partial.exists());
    assert_eq!(
        std::fs::read_to_string(&out).unwrap(),
        "case,rms_px,note\na,0.31,plain\nb,0.42,\"has, comma\"\nc,0.50,\nd,0.61,again\n"
    );
    // After finish the keys come from the final file.
    assert_eq!(completed_keys(&out, "case").unwrap(), set(&["a", "b", "c", "d"]));
    // Nothing written yet: no keys.
    assert!(completed_keys(d.join("fresh.csv"), "case").unwrap().is_empty());
}

#[test]
fn bad_rows_and_mismatched_resume_are_named_errors() {
    let d = dir("bad");
    let out = d.join("o.csv");
    let mut w = AtomicCsvWriter::create(&out, &["k", "v"]).unwrap();
    assert!(matches!(w.write_row(&["only one"]), Err(Error::ShapeMismatch { expected: 2, got: 1, .. })));
    assert!(matches!(w.write_row(&["x", "two\nlines"]), Err(Error::InvalidArgument { .. })));
    w.write_row(&["x", "1"]).unwrap();
    drop(w);
    // Refused rows left nothing behind.
    assert_eq!(std::fs::read_to_string(partial_path(&out)).unwrap(), "k,v\nx,1\n");
    match AtomicCsvWriter::resume(&out, &["k", "value"]) {
        Err(Error::Parse { location, reason, .. }) => {
            assert_eq!(location, "line 1");
            assert!(reason.contains("differs"), "{reason}");
        }
        other => panic!("{other:?}"),
    }
    match completed_keys(&out, "key") {
        Err(Error::UnknownName { name, known, .. }) => {
            assert_eq!((name.as_str(), known.as_str()), ("key", "k, v"))
        }
        other => panic!("{other:?}"),
    }
    // Resume without a partial file starts fresh.
    let other = d.join("new.csv");
    let w = AtomicCsvWriter::resume(&other, &["k"]).unwrap();
    assert_eq!(w.rows(), 0);
    w.finish().unwrap();
    assert_eq!(std::fs::read_to_string(&other).unwrap(), "k\n");
}
