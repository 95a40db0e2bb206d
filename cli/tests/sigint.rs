//! A sweep interrupted by SIGINT leaves a valid partial output: the header and complete rows
//! only (the row-atomic writer of core's io::atomic; the CLI installs no signal handler, so
//! SIGINT's default action ends the process between or during `write_all`s of whole rows).

use std::path::Path;
use std::process::{Command, Stdio};

const BIN: &str = env!("CARGO_BIN_EXE_stillsky");

#[test]
fn sigint_during_a_sweep_leaves_only_complete_rows() {
    let ex = Path::new(env!("CARGO_MANIFEST_DIR")).join("..").join("docs").join("examples");
    let d = std::env::temp_dir().join(format!("stillsky-cli-sigint-{}", std::process::id()));
    let _ = std::fs::remove_dir_all(&d);
    std::fs::create_dir_all(&d).unwrap();
    // A large job (so it cannot finish between the first rows and the signal): 600 flat PSDs ×
    // 3 wind cases × the catalogue's isolators.
    let mut grounds = Vec::new();
    for i in 0..600 {
        let level = 1e-10 * (1.0 + i as f64 / 10.0);
        let mut t = String::from("# stillsky psd, quantity=acceleration, unit=(m/s^2)^2/Hz\nfreq_hz,value\n");
        for k in 0..=60 {
            t.push_str(&format!("{:e},{level:e}\n", 0.2 * 500f64.powf(k as f64 / 60.0)));
        }
        let p = d.join(format!("g{i:03}.csv"));
        std::fs::write(&p, t).unwrap();
        grounds.push(p.display().to_string());
    }
    let out = d.join("sweep.csv");
    let partial = stillsky::io::atomic::partial_path(&out);
    let mut cmd = Command::new(BIN);
    // A job started in the background by a non-interactive shell inherits SIGINT as ignored;
    // give the child the default action so the test sees what a user's Ctrl-C does.
    {
        use std::os::unix::process::CommandExt;
        // SAFETY: only async-signal-safe `signal` between fork and exec.
        unsafe {
            cmd.pre_exec(|| {
                libc::signal(libc::SIGINT, libc::SIG_DFL);
                Ok(())
            });
        }
    }
    let mut child = cmd
        .args(["sweep", "--model"])
        .arg(ex.join("tripod-paver.toml"))
        .arg("--catalogue")
        .arg(ex.join("isolators.toml"))
        .arg("--ground")
        .args(&grounds)
        .args(["--wind", "calm", "3", "6", "--out"])
        .arg(&out)
        .stdout(Stdio::null())
        .stderr(Stdio::piped())
        .spawn()
        .unwrap();
    // Wait until some rows are on disk (polling; no time is asserted).
    let rows_on_disk =
        || std::fs::read_to_string(&partial).map(|s| s.lines().count().saturating_sub(1)).unwrap_or(0);
    let mut polls = 0;
    while rows_on_disk() < 5 {
        assert!(child.try_wait().unwrap().is_none(), "sweep ended before it could be interrupted");
        std::thread::sleep(std::time::Duration::from_millis(20));
        polls += 1;
        assert!(polls < 30_000, "no rows appeared");
    }
    let pid = child.id().to_string();
    let k = Command::new("kill").args(["-INT", &pid]).status().unwrap();
    assert!(k.success());
    let status = child.wait().unwrap();
    {
        use std::os::unix::process::ExitStatusExt;
        assert!(status.signal() == Some(2) || !status.success(), "sweep finished despite SIGINT: {status:?}");
    }
    assert!(!out.exists(), "the final output must only appear when the sweep completes");
    let text = std::fs::read_to_string(&partial).unwrap();
    assert!(
        text.ends_with('\n'),
        "partial output ends mid-row: {:?}",
        &text[text.len().saturating_sub(80)..]
    );
    let mut lines = text.lines();
    let header: Vec<&str> = lines.next().unwrap().split(',').collect();
    assert_eq!(header, stillsky::batch::SWEEP_COLUMNS.to_vec());
    let rows: Vec<&str> = lines.collect();
    assert!(rows.len() >= 5 && rows.len() < 600 * 3 * 5, "{} rows", rows.len());
    for r in &rows {
        assert_eq!(r.split(',').count(), header.len(), "incomplete row {r}");
    }
    // The reader of sweep files accepts every row, and resume would keep them all.
    assert_eq!(stillsky::batch::read_sweep_csv(&partial).unwrap().len(), rows.len());
    let keys = stillsky::io::atomic::completed_keys(&out, "key").unwrap();
    assert_eq!(keys.len(), rows.len());
    println!("interrupted after {} of {} rows; every row complete", rows.len(), 600 * 3 * 5);
    let _ = std::fs::remove_dir_all(&d);
}
