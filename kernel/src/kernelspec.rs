//! `siccant-kernel install` / `uninstall`: the kernelspec Jupyter uses to start us.
//!
//! The spec directory `<data dir>/kernels/siccant/` holds `kernel.json` (argv
//! with `{connection_file}`, display name, language, interrupt mode) and the
//! logo as SVG plus 32 and 64 px PNGs drawn from that SVG with resvg.

use std::path::{Path, PathBuf};

use serde_json::json;

/// Kernel name: the spec directory name.
pub const KERNEL_NAME: &str = "siccant";

/// The logo, our own design: warm air rising off a drying tray.
pub const LOGO_SVG: &str = include_str!("../assets/logo.svg");

/// Where to install.
#[derive(Clone, Debug)]
pub enum Target {
    /// The user's Jupyter data directory (`$JUPYTER_DATA_DIR`, else the platform default).
    User,
    /// `<prefix>/share/jupyter` (a virtual environment or conda prefix).
    Prefix(PathBuf),
}

/// The Jupyter data directory for `target`.
pub fn data_dir(target: &Target) -> Result<PathBuf, String> {
    match target {
        Target::Prefix(prefix) => Ok(prefix.join("share").join("jupyter")),
        Target::User => {
            if let Some(dir) = std::env::var_os("JUPYTER_DATA_DIR") {
                return Ok(PathBuf::from(dir));
            }
            let home = std::env::var_os("HOME").ok_or("HOME is not set; use --prefix DIR")?;
            let home = PathBuf::from(home);
            Ok(if cfg!(target_os = "macos") {
                home.join("Library").join("Jupyter")
            } else {
                std::env::var_os("XDG_DATA_HOME")
                    .map_or(home.join(".local").join("share"), PathBuf::from)
                    .join("jupyter")
            })
        }
    }
}

/// The spec directory for `target`.
pub fn spec_dir(target: &Target) -> Result<PathBuf, String> {
    Ok(data_dir(target)?.join("kernels").join(KERNEL_NAME))
}

/// The contents of kernel.json for the kernel binary at `exe`.
pub fn kernel_json(exe: &Path) -> serde_json::Value {
    json!({
        "argv": [exe.display().to_string(), "run", "--connection-file", "{connection_file}"],
        "display_name": "siccant",
        "language": "siccant",
        "interrupt_mode": "message",
        "metadata": { "debugger": false }
    })
}

/// Write the kernelspec for `exe` into `target`; returns the spec directory.
pub fn install(target: &Target, exe: &Path) -> Result<PathBuf, String> {
    let dir = spec_dir(target)?;
    let fail = |what: &'static str| {
        let dir = dir.clone();
        move |e: std::io::Error| format!("cannot write {what} in {}: {e}", dir.display())
    };
    std::fs::create_dir_all(&dir).map_err(fail("the directory"))?;
    let spec = serde_json::to_string_pretty(&kernel_json(exe)).map_err(|e| e.to_string())?;
    std::fs::write(dir.join("kernel.json"), spec + "\n").map_err(fail("kernel.json"))?;
    std::fs::write(dir.join("logo-svg.svg"), LOGO_SVG).map_err(fail("logo-svg.svg"))?;
    for size in [32, 64] {
        let png = logo_png(size)?;
        std::fs::write(dir.join(format!("logo-{size}x{size}.png")), png)
            .map_err(fail("the logo PNG"))?;
    }
    Ok(dir)
}

/// Remove the kernelspec from `target`; returns the removed directory, if there was one.
pub fn uninstall(target: &Target) -> Result<Option<PathBuf>, String> {
    let dir = spec_dir(target)?;
    if !dir.exists() {
        return Ok(None);
    }
    std::fs::remove_dir_all(&dir).map_err(|e| format!("cannot remove {}: {e}", dir.display()))?;
    Ok(Some(dir))
}

/// The logo drawn at `size` x `size` pixels, as PNG bytes.
pub fn logo_png(size: u32) -> Result<Vec<u8>, String> {
    use resvg::{tiny_skia, usvg};
    let tree =
        usvg::Tree::from_str(LOGO_SVG, &usvg::Options::default()).map_err(|e| e.to_string())?;
    let mut pixmap = tiny_skia::Pixmap::new(size, size).ok_or("logo size must be positive")?;
    let scale = size as f32 / tree.size().width();
    resvg::render(
        &tree,
        tiny_skia::Transform::from_scale(scale, scale),
        &mut pixmap.as_mut(),
    );
    pixmap.encode_png().map_err(|e| e.to_string())
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn kernel_json_names_the_connection_file_placeholder() {
        let spec = kernel_json(Path::new("/opt/bin/siccant-kernel"));
        assert_eq!(spec["argv"][3], "{connection_file}");
        assert_eq!(spec["language"], "siccant");
        assert_eq!(spec["interrupt_mode"], "message");
    }

    #[test]
    fn logo_renders_at_both_sizes_with_png_signature() {
        for size in [32, 64] {
            let png = logo_png(size).unwrap();
            assert_eq!(&png[..8], b"\x89PNG\r\n\x1a\n");
        }
    }

    #[test]
    fn install_then_uninstall_under_a_prefix() {
        let prefix = tempfile::tempdir().unwrap();
        let target = Target::Prefix(prefix.path().to_path_buf());
        let dir = install(&target, Path::new("/x/siccant-kernel")).unwrap();
        assert!(dir.ends_with("share/jupyter/kernels/siccant"));
        for file in [
            "kernel.json",
            "logo-svg.svg",
            "logo-32x32.png",
            "logo-64x64.png",
        ] {
            assert!(dir.join(file).is_file(), "{file} missing");
        }
        assert_eq!(uninstall(&target).unwrap(), Some(dir.clone()));
        assert!(!dir.exists());
        assert_eq!(uninstall(&target).unwrap(), None);
    }
}
