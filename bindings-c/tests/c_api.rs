//! Compiles the C programs in tests/c with `cc -std=c11 -Wall -Wextra -Wpedantic -Werror`,
//! links them against the staticlib cargo built next to this test binary, runs them (and once
//! under valgrind when it is installed), and checks what they print against the core crate.

use std::collections::BTreeSet;
use std::path::{Path, PathBuf};
use std::process::Command;
use stillsky::stillsky_status;
use stillsky_core::model::Model;

fn lib_dir() -> PathBuf {
    // current_exe() is target/<profile>/deps/c_api-<hash>; cargo puts libstillsky.a in deps
    // (and in the profile directory above it).
    let exe = std::env::current_exe().expect("current_exe");
    let deps = exe.parent().expect("deps dir").to_path_buf();
    for d in [deps.clone(), deps.parent().expect("profile dir").to_path_buf()] {
        if d.join("libstillsky.a").exists() {
            return d;
        }
    }
    panic!("libstillsky.a not found in {} or its parent", deps.display());
}

fn out_dir() -> PathBuf {
    let d = std::env::temp_dir().join(format!("stillsky-c-tests-{}", std::process::id()));
    std::fs::create_dir_all(&d).expect("temp dir");
    d
}

/// Compile tests/c/<name>.c into an executable and return its path.
fn compile(name: &str) -> PathBuf {
    let crate_dir = Path::new(env!("CARGO_MANIFEST_DIR"));
    let exe = out_dir().join(name);
    let cc = std::env::var("CC").unwrap_or_else(|_| "cc".into());
    let out = Command::new(&cc)
        .current_dir(crate_dir)
        .args(["-std=c11", "-Wall", "-Wextra", "-Wpedantic", "-Werror", "-g", "-I", "include"])
        .arg(crate_dir.join("tests/c").join(format!("{name}.c")))
        .arg(lib_dir().join("libstillsky.a"))
        .args(["-lpthread", "-ldl", "-lm", "-o"])
        .arg(&exe)
        .output()
        .unwrap_or_else(|e| panic!("cannot run {cc}: {e}"));
    assert!(
        out.status.success(),
        "compiling {name}.c failed:\n{}{}",
        String::from_utf8_lossy(&out.stdout),
        String::from_utf8_lossy(&out.stderr)
    );
    exe
}

/// Run a program; assert exit 0; return stdout.
fn run(cmd: &mut Command, what: &str) -> String {
    let out = cmd.output().unwrap_or_else(|e| panic!("cannot run {what}: {e}"));
    let stdout = String::from_utf8_lossy(&out.stdout).into_owned();
    println!(
        "--- {what} stdout ---\n{stdout}--- {what} stderr ---\n{}",
        String::from_utf8_lossy(&out.stderr)
    );
    assert!(out.status.success(), "{what} exited with {:?}", out.status);
    stdout
}

fn reached(stdout: &str) -> BTreeSet<String> {
    stdout
        .lines()
        .filter_map(|l| l.strip_prefix("reached "))
        .filter_map(|l| l.split_whitespace().next())
        .map(String::from)
        .collect()
}

#[path = "../../tests/src/fixtures.rs"]
mod fixtures;

/// The model of smoke.c (the shared fixture with smoke.c's numbers; a difference fails the 1e-12
/// comparison).
fn smoke_model() -> String {
    fixtures::sdof_toml(25.0, "stiffness_n_per_m = 4e5\nloss_factor = 0.08")
}

#[test]
fn c_programs_pass_and_match_core() {
    let smoke = compile("smoke");
    let errors = compile("errors");
    let monitor = compile("monitor");
    let matrix = compile("errors_matrix");
    let people = compile("people");
    let ringdown_sensor = compile("ringdown_sensor");

    // Happy path: the C program checks the closed form itself; here the numbers it wrote are
    // compared with the core crate called directly.
    let file = out_dir().join("smoke_frf.txt");
    run(Command::new(&smoke).arg(&file), "smoke");
    let text = std::fs::read_to_string(&file).expect("smoke output file");
    let rows: Vec<[f64; 3]> = text
        .lines()
        .map(|l| {
            let v: Vec<f64> = l.split_whitespace().map(|x| x.parse().expect("number")).collect();
            [v[0], v[1], v[2]]
        })
        .collect();
    assert_eq!(rows.len(), 50);
    let f: Vec<f64> = rows.iter().map(|r| r[0]).collect();
    let model = Model::from_toml_str(&smoke_model(), "smoke").expect("model");
    let h =
        model.frf(&f, &["ground_z"], &["mass:z"]).expect("frf").series("mass:z", "ground_z").expect("series");
    for (r, h) in rows.iter().zip(&h) {
        // %.17g round-trips doubles, so C and Rust agree far below 1e-12.
        let d = ((r[1] - h.re).powi(2) + (r[2] - h.im).powi(2)).sqrt() / h.norm();
        assert!(d <= 1e-12, "C {r:?} vs core {h}: {d:e}");
    }

    // docs/errors.md: every row whose C cell is not "n/a" is printed as "row ID ok".
    let printed = run(Command::new(&matrix).current_dir(out_dir()), "errors_matrix");
    let doc = std::fs::read_to_string(Path::new(env!("CARGO_MANIFEST_DIR")).join("../docs/errors.md"))
        .expect("docs/errors.md");
    let mut rows = 0;
    let matrix_rows = doc.split("<!-- matrix -->").nth(1).and_then(|t| t.split("\n## ").next()).unwrap_or("");
    for line in matrix_rows.lines().filter(|l| l.starts_with("| `")) {
        let cells: Vec<&str> = line.split('|').map(str::trim).collect();
        let id = cells[1].trim_matches('`');
        if !cells[6].starts_with("n/a") {
            assert!(printed.contains(&format!("row {id} ok")), "C case for row {id} did not pass");
            rows += 1;
        }
    }
    assert!(rows >= 20, "only {rows} C rows in docs/errors.md");

    let mut seen = reached(&run(&mut Command::new(&errors), "errors"));
    let mon = run(&mut Command::new(&monitor), "monitor");
    seen.extend(reached(&mon));
    // People and machines near the rig: hand formulas checked in the C program itself.
    seen.extend(reached(&run(&mut Command::new(&people), "people")));
    // The ring-down card and a geophone's response: closed forms checked in the C program.
    seen.extend(reached(&run(&mut Command::new(&ringdown_sensor), "ringdown_sensor")));
    for l in mon.lines().filter(|l| l.starts_with("rel_err")) {
        let v: f64 = l.split_whitespace().nth(2).expect("value").parse().expect("number");
        assert!(v.is_finite(), "{l}");
    }

    // Every status code is reached: by the C programs, or (codes C cannot provoke without a
    // core bug or a non-converging eigen solver) by `rust_side_status_codes` below.
    let rust_only =
        [stillsky_status::Internal, stillsky_status::NoConvergence, stillsky_status::NotPositiveDefinite];
    for s in stillsky_status::ALL {
        let name = unsafe { std::ffi::CStr::from_ptr(stillsky::stillsky_status_str(s as i32)) }
            .to_str()
            .unwrap()
            .to_owned();
        assert!(seen.contains(&name) || rust_only.contains(&s), "no C test reaches {name}; seen {seen:?}");
    }

    // valgrind: zero errors and zero leaks (definite and possible) for all three programs;
    // the summary must also show no definitely lost bytes.
    match Command::new("valgrind").arg("--version").output() {
        Ok(o) if o.status.success() => {
            let quick = std::ffi::OsString::from("--quick");
            for (exe, arg) in [
                (&smoke, Some(file.clone().into_os_string())),
                (&errors, None),
                (&monitor, Some(quick)),
                (&matrix, None),
                (&people, None),
                (&ringdown_sensor, None),
            ] {
                let mut c = Command::new("valgrind");
                c.args([
                    "--error-exitcode=1",
                    "--leak-check=full",
                    "--errors-for-leak-kinds=definite,possible",
                    "-q",
                ]);
                // Only rayon's still-running worker threads' TLS (see the file) is suppressed.
                c.arg(format!(
                    "--suppressions={}",
                    Path::new(env!("CARGO_MANIFEST_DIR")).join("tests/valgrind.supp").display()
                ));
                c.arg(exe).current_dir(out_dir());
                if let Some(a) = arg {
                    c.arg(a);
                }
                run(&mut c, &format!("valgrind {}", exe.display()));
            }
        }
        _ => println!("note: valgrind not found; skipping the valgrind run"),
    }
    let _ = std::fs::remove_dir_all(out_dir());
}

#[test]
fn rust_side_status_codes() {
    use stillsky::status_of;
    use stillsky_core::Error;
    // Exhaustive over the core variants (a new variant fails to compile in status_of first).
    let s = String::new;
    let cases = [
        (Error::invalid("a", "b"), stillsky_status::InvalidArgument),
        (Error::shape("a", 1, 2), stillsky_status::ShapeMismatch),
        (Error::InvalidGrid { name: s(), reason: s() }, stillsky_status::InvalidGrid),
        (Error::OutOfRange { what: s(), value: 0.0, min: 0.0, max: 1.0 }, stillsky_status::OutOfRange),
        (Error::UnknownName { kind: s(), name: s(), known: s() }, stillsky_status::UnknownName),
        (Error::unsupported("x"), stillsky_status::UnsupportedModel),
        (Error::Singular { freq_hz: 1.0 }, stillsky_status::Singular),
        (Error::NotPositiveDefinite { matrix: s(), reason: s() }, stillsky_status::NotPositiveDefinite),
        (Error::NoConvergence { what: s(), reason: s() }, stillsky_status::NoConvergence),
        (Error::Parse { file: s(), location: s(), reason: s() }, stillsky_status::Parse),
        (Error::Io { path: s(), reason: s() }, stillsky_status::Io),
        (Error::TooLarge { what: s(), value: 2, limit: 1 }, stillsky_status::TooLarge),
    ];
    for (e, want) in &cases {
        assert_eq!(status_of(e), *want, "{e}");
    }
    // A panic inside an export body is caught and becomes INTERNAL with the panic text.
    let code = stillsky::guard("probe_export", || panic!("deliberate panic for the boundary test"));
    assert_eq!(code, stillsky_status::Internal as i32);
    let mut buf = [0 as std::ffi::c_char; 256];
    unsafe { stillsky::stillsky_last_error_message(buf.as_mut_ptr(), buf.len()) };
    let msg = unsafe { std::ffi::CStr::from_ptr(buf.as_ptr()) }.to_string_lossy().into_owned();
    assert!(msg.contains("probe_export") && msg.contains("deliberate panic"), "{msg}");
    // Numbers are fixed: the header's values, never renumbered.
    let nums: Vec<i32> = stillsky_status::ALL.iter().map(|s| *s as i32).collect();
    assert_eq!(nums, (0..16).collect::<Vec<_>>());
    assert_eq!(stillsky_status::from_i32(16), None);
    assert_eq!(stillsky_status::from_i32(-1), None);
}

#[test]
fn docs_example_is_the_smoke_test_and_pc_template_matches_link_flags() {
    let root = Path::new(env!("CARGO_MANIFEST_DIR"));
    let smoke = std::fs::read_to_string(root.join("tests/c/smoke.c")).expect("smoke.c");
    let doc = std::fs::read_to_string(root.join("../docs/c-api.md")).expect("docs/c-api.md");
    assert!(doc.contains(&format!("```c\n{smoke}```")), "docs/c-api.md must hold tests/c/smoke.c verbatim");
    let pc = std::fs::read_to_string(root.join("stillsky.pc.in")).expect("stillsky.pc.in");
    assert!(pc.lines().any(|l| l == "Libs: -L${libdir} -lstillsky"), "{pc}");
    // The same system libraries this test links the C programs with.
    assert!(pc.lines().any(|l| l == "Libs.private: -lpthread -ldl -lm"), "{pc}");
    assert!(pc.contains("Version: @VERSION@") && pc.contains("prefix=@PREFIX@"));
}

/// The monitor tests' rig in C (tests/c/monitor_rig.h) is the text of tests/data/monitor-rig.toml
/// (without its comment lines), which the Python tests and the Rust bench read.
#[test]
fn the_c_monitor_rig_is_the_shared_rig_file() {
    let crate_dir = Path::new(env!("CARGO_MANIFEST_DIR"));
    let header = std::fs::read_to_string(crate_dir.join("tests/c/monitor_rig.h")).expect("monitor_rig.h");
    let body = &header[header.find("MODEL[]").expect("MODEL[] in monitor_rig.h")..];
    let body = &body[..body.find(';').expect("end of MODEL[]")];
    // Concatenate the C string literals and undo their escapes (\n and \" only are used).
    let mut text = String::new();
    let mut chars = body.chars().peekable();
    let mut inside = false;
    while let Some(ch) = chars.next() {
        match (inside, ch) {
            (false, '"') => inside = true,
            (true, '"') => inside = false,
            (true, '\\') => match chars.next() {
                Some('n') => text.push('\n'),
                Some(other) => text.push(other),
                None => {}
            },
            (true, _) => text.push(ch),
            _ => {}
        }
    }
    let file =
        std::fs::read_to_string(crate_dir.join("../tests/data/monitor-rig.toml")).expect("monitor-rig.toml");
    let want: String = file.lines().filter(|l| !l.starts_with('#')).map(|l| format!("{l}\n")).collect();
    assert_eq!(text, want);
}
