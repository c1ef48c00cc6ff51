//! Loading and saving study profiles: RON text, format version check, validation, and
//! atomic writes (temporary file in the same folder, fsync, rename, fsync of the folder).

use crate::convert::validate;
use crate::error::{ProfileError, Result};
use crate::study::{FORMAT_VERSION, OLDEST_FORMAT_VERSION, Study};
use serde::Deserialize;
use std::io::Write;
use std::path::{Path, PathBuf};

#[derive(Deserialize)]
#[serde(rename = "Study")]
struct VersionProbe {
    #[serde(default)]
    format_version: u32,
}

fn syntax(path: &Path, e: &ron::error::SpannedError) -> ProfileError {
    ProfileError::Syntax {
        path: path.to_path_buf(),
        line: e.span.start.line,
        column: e.span.start.col,
        message: e.code.to_string(),
    }
}

/// Parses and validates a study from RON text; `path` names it in errors.
pub fn parse_study(text: &str, path: &Path) -> Result<Study> {
    if text.trim().is_empty() {
        return Err(ProfileError::Syntax {
            path: path.to_path_buf(),
            line: 1,
            column: 1,
            message: "the file is empty".into(),
        });
    }
    // Hand-written files may leave out `Some(..)` around optional values.
    let opts = ron::Options::default().with_default_extension(ron::extensions::Extensions::IMPLICIT_SOME);
    let probe: VersionProbe = opts.from_str(text).map_err(|e| syntax(path, &e))?;
    match probe.format_version {
        0 => {
            return Err(ProfileError::Invalid {
                path: path.to_path_buf(),
                field: "format_version".into(),
                value: "(missing)".into(),
                allowed: format!("a version number, {OLDEST_FORMAT_VERSION} to {FORMAT_VERSION}"),
            });
        }
        v if v > FORMAT_VERSION => {
            return Err(ProfileError::NewerFormat { path: path.to_path_buf(), found: v, supported: FORMAT_VERSION });
        }
        // Older formats are read in their own schema and upgraded.
        1 => {
            let old: crate::upgrade::StudyV1 = opts.from_str(text).map_err(|e| syntax(path, &e))?;
            let study = old.upgrade();
            validate(&study).map_err(|e| e.in_file(path))?;
            return Ok(study);
        }
        _ => {}
    }
    let mut study: Study = opts.from_str(text).map_err(|e| syntax(path, &e))?;
    // Format 2 is format 3 without a trap model: nothing else to upgrade.
    if study.format_version == 2 {
        if study.trap.model.is_some() {
            return Err(ProfileError::Invalid {
                path: path.to_path_buf(),
                field: "trap.model".into(),
                value: "given in a format-2 file".into(),
                allowed: "a trap model only from format_version 3 on (change the version to 3)".into(),
            });
        }
        study.format_version = FORMAT_VERSION;
    }
    validate(&study).map_err(|e| e.in_file(path))?;
    Ok(study)
}

/// Loads a study from a file.
pub fn load_study(path: &Path) -> Result<Study> {
    let text = std::fs::read_to_string(path).map_err(|source| ProfileError::Io { path: path.to_path_buf(), source })?;
    parse_study(&text, path)
}

/// The RON text of a study (pretty, stable field order).
pub fn study_to_string(study: &Study) -> Result<String> {
    let cfg = ron::ser::PrettyConfig::new().depth_limit(8).struct_names(true);
    ron::ser::to_string_pretty(study, cfg).map_err(|e| ProfileError::invalid("study", "", e.to_string()))
}

/// Saves a study atomically: the old file stays intact until the new one is complete
/// on disk. Validates first; never writes an invalid study.
pub fn save_study(study: &Study, path: &Path) -> Result<()> {
    validate(study).map_err(|e| e.in_file(path))?;
    let text = study_to_string(study)?;
    write_atomically(path, text.as_bytes())
}

/// Writes bytes to `path` atomically (temp file in the same folder, fsync, rename). The
/// file gets the usual permissions: those of the file it replaces, else what the
/// process umask leaves of read-write for everyone (as any program's new file).
pub fn write_atomically(path: &Path, bytes: &[u8]) -> Result<()> {
    let io = |source| ProfileError::Io { path: path.to_path_buf(), source };
    let dir: PathBuf = match path.parent() {
        Some(p) if !p.as_os_str().is_empty() => p.to_path_buf(),
        _ => PathBuf::from("."),
    };
    let mut builder = tempfile::Builder::new();
    builder.prefix(".quenchless-").suffix(".tmp");
    let replaced = std::fs::metadata(path).ok().map(|m| m.permissions());
    #[cfg(unix)]
    {
        use std::os::unix::fs::PermissionsExt;
        // The mode passed to open(2), which the umask then narrows.
        builder.permissions(std::fs::Permissions::from_mode(0o666));
    }
    let mut tmp = builder.tempfile_in(&dir).map_err(io)?;
    if let Some(perm) = replaced {
        tmp.as_file().set_permissions(perm).map_err(io)?;
    }
    tmp.write_all(bytes).map_err(io)?;
    tmp.as_file().sync_all().map_err(io)?;
    tmp.persist(path).map_err(|e| io(e.error))?;
    // Make the rename itself durable.
    if let Ok(d) = std::fs::File::open(&dir) {
        let _ = d.sync_all();
    }
    Ok(())
}
