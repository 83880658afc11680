//! Reading and writing session files: RON with a format version, saved atomically.

use std::io::Write;
use std::path::{Path, PathBuf};

use serde::Deserialize;

use super::Session;

/// Format version this build writes. Files with a higher number are refused; lower numbers are
/// migrated on reading.
pub const SESSION_FORMAT_VERSION: u32 = 5;

const HEADER: &str = "\
// comptrail appraisal session. Human-readable on purpose: every comparable, every adjustment
// with its basis, the fitted rates, the worksheet inputs and the result are kept here so the
// value can be checked and reproduced without the market file. Editing a number by hand makes
// the file disagree with its saved result; comptrail will say where.
";

/// Why a session file cannot be read or written.
#[derive(Debug, thiserror::Error)]
pub enum SessionError {
    /// The file could not be read or written.
    #[error("{path}: {source}")]
    Io {
        /// The file.
        path: PathBuf,
        /// The system's reason.
        source: std::io::Error,
    },
    /// The text is not a session: damaged, cut short or edited into something else.
    #[error("{source_name}, line {line}, column {column}{field}: {message}")]
    Syntax {
        /// File name.
        source_name: String,
        /// Line, from 1.
        line: usize,
        /// Column, from 1.
        column: usize,
        /// ", field `name`" when the error sits under a named field.
        field: String,
        /// What was wrong.
        message: String,
    },
    /// Written by a newer comptrail.
    #[error(
        "{source_name} was written by a newer comptrail (session format {found}; this build reads up to {supported}). Update comptrail to open it."
    )]
    NewerVersion {
        /// File name.
        source_name: String,
        /// Version in the file.
        found: u32,
        /// Newest version this build reads.
        supported: u32,
    },
    /// Older than any version this build can migrate.
    #[error("{source_name}: session format {found} is not one comptrail has ever written")]
    UnknownVersion {
        /// File name.
        source_name: String,
        /// Version in the file.
        found: u32,
    },
    /// The session could not be turned into text.
    #[error("could not write the session: {0}")]
    Serialize(String),
}

#[derive(Deserialize)]
struct VersionProbe {
    format_version: u32,
}

/// The format version a session text declares, if it can be read.
#[must_use]
pub fn format_version_of(text: &str) -> Option<u32> {
    ron::from_str::<VersionProbe>(text)
        .ok()
        .map(|p| p.format_version)
}

/// The session as RON text, with a header comment.
pub fn session_to_ron(session: &Session) -> Result<String, SessionError> {
    let config = ron::ser::PrettyConfig::new()
        .struct_names(false)
        .indentor("  ".to_owned());
    let body = ron::ser::to_string_pretty(session, config)
        .map_err(|e| SessionError::Serialize(e.to_string()))?;
    Ok(format!("{HEADER}{body}\n"))
}

/// The name of the field whose value starts nearest before `offset`: the last `name:` in the
/// text before the error.
fn field_before(text: &str, offset: usize) -> Option<&str> {
    let head = text.get(..offset.min(text.len()))?;
    let mut rest = head;
    while let Some(colon) = rest.rfind(':') {
        let before = rest[..colon].trim_end();
        // Just after the last character that cannot be in a name (which may be several bytes
        // long: the text is whatever the file holds).
        let start = before
            .char_indices()
            .rev()
            .find(|(_, c)| !(c.is_ascii_alphanumeric() || *c == '_'))
            .map_or(0, |(i, c)| i + c.len_utf8());
        let name = &before[start..];
        if !name.is_empty()
            && name
                .chars()
                .next()
                .is_some_and(|c| c.is_ascii_alphabetic() || c == '_')
        {
            // A colon inside a string ("basis: ...") is not a field; fields sit at the start
            // of their line after indentation, or after "(".
            let line_start = before[..start].rfind('\n').map_or(0, |i| i + 1);
            let lead = before[line_start..start].trim();
            if lead.is_empty() || lead.ends_with('(') {
                return Some(name);
            }
        }
        rest = &rest[..colon];
    }
    None
}

fn offset_of(text: &str, line: usize, column: usize) -> usize {
    let mut offset = 0;
    for (i, l) in text.split_inclusive('\n').enumerate() {
        if i + 1 == line {
            return offset
                + l.char_indices()
                    .nth(column.saturating_sub(1))
                    .map_or(l.len(), |(b, _)| b);
        }
        offset += l.len();
    }
    text.len()
}

/// Whether the text stops inside a string or with brackets still open: a file cut short.
fn looks_cut_short(text: &str) -> bool {
    let (mut depth, mut in_string, mut escaped) = (0_i64, false, false);
    let mut chars = text.chars().peekable();
    while let Some(c) = chars.next() {
        if in_string {
            match (escaped, c) {
                (true, _) => escaped = false,
                (false, '\\') => escaped = true,
                (false, '"') => in_string = false,
                _ => {}
            }
            continue;
        }
        match c {
            '"' => in_string = true,
            '(' | '[' | '{' => depth += 1,
            ')' | ']' | '}' => depth -= 1,
            '/' if chars.peek() == Some(&'/') => {
                for skipped in chars.by_ref() {
                    if skipped == '\n' {
                        break;
                    }
                }
            }
            _ => {}
        }
    }
    in_string || depth > 0
}

fn syntax_error(text: &str, source_name: &str, e: &ron::error::SpannedError) -> SessionError {
    let (line, column) = (e.span.start.line, e.span.start.col);
    let offset = offset_of(text, line, column);
    let field = field_before(text, offset)
        .map(|f| format!(", field `{f}`"))
        .unwrap_or_default();
    let at_end = looks_cut_short(text);
    let message = match &e.code {
        ron::Error::Eof => "the file ends too early (cut short?)".to_owned(),
        other if at_end => format!("the file ends too early (cut short?): {other}"),
        other => other.to_string(),
    };
    SessionError::Syntax {
        source_name: source_name.to_owned(),
        line,
        column,
        field,
        message,
    }
}

/// Reads a session from RON text; `source_name` names the file in errors.
pub fn parse_session(text: &str, source_name: &str) -> Result<Session, SessionError> {
    // The version is read first so a newer file is refused by name, not by whatever field it
    // added.
    let version = ron::from_str::<VersionProbe>(text).map(|p| p.format_version);
    if let Ok(version) = version {
        if version > SESSION_FORMAT_VERSION {
            return Err(SessionError::NewerVersion {
                source_name: source_name.to_owned(),
                found: version,
                supported: SESSION_FORMAT_VERSION,
            });
        }
        if version == 0 {
            return Err(SessionError::UnknownVersion {
                source_name: source_name.to_owned(),
                found: version,
            });
        }
    }
    match version {
        Ok(1) => {
            let _rounding = crate::money::RoundAmountsOnRead::begin();
            ron::from_str::<super::legacy::SessionV1>(text)
                .map(super::legacy::SessionV1::migrate)
                .map_err(|e| syntax_error(text, source_name, &e))
        }
        Ok(2) => {
            let _rounding = crate::money::RoundAmountsOnRead::begin();
            ron::from_str::<super::legacy::SessionV2To3>(text)
                .map(super::legacy::SessionV2To3::migrate)
                .map_err(|e| syntax_error(text, source_name, &e))
        }
        Ok(3) => ron::from_str::<super::legacy::SessionV2To3>(text)
            .map(super::legacy::SessionV2To3::migrate)
            .map_err(|e| syntax_error(text, source_name, &e)),
        _ => ron::from_str::<Session>(text).map_err(|e| syntax_error(text, source_name, &e)),
    }
}

/// Reads a session file.
pub fn read_session(path: &Path) -> Result<Session, SessionError> {
    let bytes = std::fs::read(path).map_err(|source| SessionError::Io {
        path: path.to_owned(),
        source,
    })?;
    let name = path.display().to_string();
    let text = String::from_utf8(bytes).map_err(|e| {
        let upto = &e.as_bytes()[..e.utf8_error().valid_up_to()];
        let line = memchr::memchr_iter(b'\n', upto).count() + 1;
        SessionError::Syntax {
            source_name: name.clone(),
            line,
            column: upto.len() - upto.iter().rposition(|&b| b == b'\n').map_or(0, |i| i + 1) + 1,
            field: String::new(),
            message: "bytes that are not UTF-8 text (the file is damaged)".into(),
        }
    })?;
    parse_session(&text, &name)
}

/// Writes `bytes` to `path` so that a crash leaves either the old file or the new one, never a
/// mix: write a temporary file beside it, flush it to disk, then rename it over the old one.
pub fn write_atomically(path: &Path, bytes: &[u8]) -> Result<(), SessionError> {
    let io = |source| SessionError::Io {
        path: path.to_owned(),
        source,
    };
    let dir = path
        .parent()
        .filter(|p| !p.as_os_str().is_empty())
        .unwrap_or(Path::new("."));
    let name = path
        .file_name()
        .map_or_else(|| "session".into(), |n| n.to_string_lossy().into_owned());
    let tmp = dir.join(format!(".{name}.{}.tmp", std::process::id()));
    let written = (|| {
        let mut file = std::fs::File::create(&tmp)?;
        file.write_all(bytes)?;
        file.sync_all()?;
        drop(file);
        std::fs::rename(&tmp, path)
    })();
    if let Err(e) = written {
        let _ = std::fs::remove_file(&tmp);
        return Err(io(e));
    }
    // Make the rename itself durable where the platform allows syncing a directory.
    if let Ok(d) = std::fs::File::open(dir) {
        let _ = d.sync_all();
    }
    Ok(())
}

/// `to` written from `dir` ("../assets/market.csv"), when both are absolute.
fn relative_path(dir: &Path, to: &Path) -> Option<PathBuf> {
    use std::path::Component;
    if !(dir.is_absolute() && to.is_absolute()) {
        return None;
    }
    let (a, b): (Vec<Component<'_>>, Vec<Component<'_>>) =
        (dir.components().collect(), to.components().collect());
    let common = a.iter().zip(&b).take_while(|(x, y)| x == y).count();
    let mut out = PathBuf::new();
    for _ in common..a.len() {
        out.push("..");
    }
    for c in &b[common..] {
        out.push(c.as_os_str());
    }
    Some(out)
}

/// Saves a session atomically, recording where its market file is from the session's folder.
pub fn write_session(path: &Path, session: &Session) -> Result<(), SessionError> {
    let mut session = session.clone();
    session.format_version = SESSION_FORMAT_VERSION;
    let dir = path
        .parent()
        .filter(|p| !p.as_os_str().is_empty())
        .map_or_else(
            || std::env::current_dir().ok(),
            |d| std::fs::canonicalize(d).ok(),
        );
    if let (Some(dir), Some(market)) = (dir, session.market.location.absolute.as_deref()) {
        session.market.location.from_session =
            relative_path(&dir, Path::new(market)).map(|p| p.to_string_lossy().replace('\\', "/"));
    }
    write_atomically(path, session_to_ron(&session)?.as_bytes())
}
