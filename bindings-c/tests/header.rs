//! The committed header equals what cbindgen generates from the sources, byte for byte.
//! `BLESS=1 cargo test -p stillsky-c --test header` rewrites it.

use std::path::Path;

#[test]
fn committed_header_is_current() {
    let dir = Path::new(env!("CARGO_MANIFEST_DIR"));
    let config = cbindgen::Config::from_file(dir.join("cbindgen.toml")).expect("cbindgen.toml");
    let bindings = cbindgen::Builder::new()
        .with_crate(dir)
        .with_config(config)
        .generate()
        .expect("cbindgen generates the header");
    let mut generated = Vec::new();
    bindings.write(&mut generated);
    let path = dir.join("include/stillsky.h");
    if std::env::var_os("BLESS").is_some_and(|v| v == "1") {
        std::fs::write(&path, &generated).expect("write include/stillsky.h");
        return;
    }
    let committed = std::fs::read(&path).unwrap_or_default();
    if committed != generated {
        let first = committed
            .iter()
            .zip(&generated)
            .position(|(a, b)| a != b)
            .unwrap_or(committed.len().min(generated.len()));
        let line = generated[..first].iter().filter(|&&c| c == b'\n').count() + 1;
        panic!(
            "include/stillsky.h is stale (first difference near line {line}); run \
             `BLESS=1 cargo test -p stillsky-c --test header` and commit the result"
        );
    }
}
