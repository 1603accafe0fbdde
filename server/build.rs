//! Builds the browser app (`web`) for wasm32 and embeds it in the `hadamard` binary.
//!
//! The `web` crate is compiled by a nested `cargo build --target wasm32-unknown-unknown` into a
//! target directory of its own (sharing the outer one deadlocks on cargo's lock), with
//! `-C target-feature=+simd128` (core's simd128 kernel; every current browser has simd128),
//! then run through wasm-bindgen as a library, so no CLI tool is needed. It has two binaries:
//! the app (`web.js`, `web_bg.wasm`) and the check module of its Web Workers (`check.js`,
//! `check_bg.wasm`, started by `web/src/check-worker.js`). All five files are written to
//! `OUT_DIR`, where `src/web_assets.rs` includes them.
//!
//! Knobs (environment):
//! - `SKIP_WEB_BUILD=1` embeds a placeholder instead, for fast `cargo check` and clippy runs;
//!   the served page then says the browser app was not built.
//! - `WASM_OPT=/path/to/wasm-opt` runs that wasm-opt (`-Oz`) on the app's module. Optional, and
//!   off by default: on this app it saves about 6% (636 → 595 KB, 264 → 260 KB gzipped, with
//!   the npm `binaryen` package's wasm-opt 132) for about 11 s of build; Debian 12's binaryen
//!   108 breaks the output. The workers' check module is left as rustc made it: it is 50 KB and
//!   holds the hot loop.

use std::env;
use std::path::{Path, PathBuf};
use std::process::Command;

fn main() {
    println!("cargo:rerun-if-env-changed=SKIP_WEB_BUILD");
    println!("cargo:rerun-if-env-changed=WASM_OPT");
    let manifest =
        PathBuf::from(env::var("CARGO_MANIFEST_DIR").expect("cargo sets CARGO_MANIFEST_DIR"));
    let root = manifest
        .parent()
        .expect("server/ sits in the workspace")
        .to_path_buf();
    for dir in [
        "web/src",
        "web/Cargo.toml",
        "core/src",
        "core/Cargo.toml",
        "seed-catalogue",
        "Cargo.lock",
    ] {
        println!("cargo:rerun-if-changed={}", root.join(dir).display());
    }
    let out = PathBuf::from(env::var("OUT_DIR").expect("cargo sets OUT_DIR"));

    if env::var_os("SKIP_WEB_BUILD").is_some_and(|v| !v.is_empty() && v != "0") {
        placeholder(&out);
        return;
    }

    ensure_wasm_target();
    let target_dir = match env::var_os("CARGO_TARGET_DIR") {
        Some(t) => PathBuf::from(t).join("wasm"),
        None => root.join("target").join("wasm"),
    };
    let cargo = env::var("CARGO").unwrap_or_else(|_| "cargo".into());
    let mut cmd = Command::new(cargo);
    cmd.current_dir(&root)
        .args([
            "build",
            "-p",
            "hadamard-web",
            "--target",
            "wasm32-unknown-unknown",
            "--profile",
            "wasm-release",
            "--target-dir",
        ])
        .arg(&target_dir);
    // The child must not inherit the outer build's settings: the jobserver flags make it run one
    // job at a time, and wrappers or flags meant for the host would leak into the wasm build.
    for (k, _) in env::vars_os() {
        let k = k.to_string_lossy().to_string();
        let leaks = (k.starts_with("CARGO_") && k != "CARGO_HOME")
            || matches!(
                k.as_str(),
                "RUSTFLAGS"
                    | "RUSTC_WRAPPER"
                    | "RUSTC_WORKSPACE_WRAPPER"
                    | "MAKEFLAGS"
                    | "MFLAGS"
                    | "RUSTC"
                    | "RUSTDOC"
            );
        if leaks {
            cmd.env_remove(&k);
        }
    }
    // Set, not inherited: only the wasm32 artifacts see it (with --target, build scripts and
    // proc macros are built without it).
    cmd.env("CARGO_ENCODED_RUSTFLAGS", "-Ctarget-feature=+simd128");
    println!(
        "cargo:warning=building the browser app for wasm32 (about 3 minutes on a clean machine)"
    );
    let status = cmd
        .status()
        .expect("could not run cargo for the wasm32 build of web/");
    if !status.success() {
        panic!("the wasm32 build of web/ failed; run `cargo build -p hadamard-web --target wasm32-unknown-unknown` to see why");
    }
    let built = target_dir
        .join("wasm32-unknown-unknown")
        .join("wasm-release");
    for (bin, name) in [("hadamard-web", "web"), ("hadamard-check-worker", "check")] {
        let mut bindgen = wasm_bindgen_cli_support::Bindgen::new();
        bindgen
            .input_path(built.join(format!("{bin}.wasm")))
            .web(true)
            .expect("wasm-bindgen web mode")
            .out_name(name)
            .typescript(false);
        bindgen
            .generate(&out)
            .unwrap_or_else(|e| panic!("wasm-bindgen could not process {bin}: {e}"));
    }
    if let Some(opt) = env::var_os("WASM_OPT").filter(|v| !v.is_empty()) {
        optimise(Path::new(&opt), &out.join("web_bg.wasm"));
    }
    std::fs::copy(
        root.join("web/src/check-worker.js"),
        out.join("check-worker.js"),
    )
    .expect("copy web/src/check-worker.js");
}

/// Shrinks `file` in place with wasm-opt, keeping the unoptimised file if it fails. The
/// features are the ones rustc's wasm32 target emits, plus simd128.
fn optimise(opt: &Path, file: &Path) {
    let tmp = file.with_extension("opt.wasm");
    let ok = Command::new(opt)
        .arg("-Oz")
        .args([
            "--enable-simd",
            "--enable-bulk-memory",
            "--enable-nontrapping-float-to-int",
            "--enable-sign-ext",
        ])
        .args([
            "--enable-mutable-globals",
            "--enable-reference-types",
            "--enable-multivalue",
        ])
        .arg(file)
        .arg("-o")
        .arg(&tmp)
        .status();
    if matches!(ok, Ok(s) if s.success()) && std::fs::rename(&tmp, file).is_ok() {
        return;
    }
    let _ = std::fs::remove_file(&tmp);
    println!(
        "cargo:warning=wasm-opt failed on {}; serving it unoptimised",
        file.display()
    );
}

/// Installs the wasm32 target with rustup when the toolchain lacks it (a rust-toolchain.toml
/// cannot do this here: RUSTUP_AUTO_INSTALL=0).
fn ensure_wasm_target() {
    let rustc = env::var("RUSTC").unwrap_or_else(|_| "rustc".into());
    let sysroot = Command::new(&rustc)
        .args(["--print", "sysroot"])
        .output()
        .ok()
        .map(|o| String::from_utf8_lossy(&o.stdout).trim().to_string());
    if let Some(root) = sysroot {
        if Path::new(&root)
            .join("lib/rustlib/wasm32-unknown-unknown")
            .exists()
        {
            return;
        }
    }
    println!("cargo:warning=installing the wasm32-unknown-unknown target with rustup");
    let ok = Command::new("rustup")
        .args(["target", "add", "wasm32-unknown-unknown"])
        .status();
    if !matches!(ok, Ok(s) if s.success()) {
        panic!("the wasm32-unknown-unknown target is missing and `rustup target add wasm32-unknown-unknown` failed");
    }
}

fn placeholder(out: &Path) {
    std::fs::write(
        out.join("web.js"),
        "export default async function init() { document.body.insertAdjacentHTML('beforeend', '<p role=\"alert\">This server was built with SKIP_WEB_BUILD: the browser app is not included.</p>'); }\n",
    )
    .expect("write placeholder web.js");
    std::fs::write(out.join("web_bg.wasm"), b"").expect("write placeholder wasm");
    for name in ["check.js", "check_bg.wasm", "check-worker.js"] {
        std::fs::write(out.join(name), b"").expect("write placeholder worker files");
    }
}
