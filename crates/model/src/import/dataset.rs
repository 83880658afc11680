//! A market kept as Parquet: one `.parquet` file, or a folder of them partitioned in the
//! `key=value/` layout that analytical engines read and write (`make=…/model=…/part-0.parquet`).
//!
//! Finding the files, reading the partition values out of their paths (percent-escaped as those
//! engines escape them), choosing the partitions one make and model needs, numbering the rows
//! across the whole dataset and fingerprinting what was read.

use std::collections::BTreeMap;
use std::fmt::Write as _;
use std::path::{Path, PathBuf};

use crate::vocabulary::name_key;

/// Hive's name for a partition whose value is null.
pub const NULL_PARTITION: &str = "__HIVE_DEFAULT_PARTITION__";

/// One Parquet file of a dataset.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct PartFile {
    /// Full path.
    pub path: PathBuf,
    /// Path from the dataset's root with `/` separators ("make=A/model=B/part-0.parquet"), or
    /// the file name for a single file.
    pub relative: String,
    /// `key=value` pairs of its folders, keys as written, values unescaped; `None` for the null
    /// partition.
    pub partition: Vec<(String, Option<String>)>,
}

impl PartFile {
    /// The value of partition key `field_key` (compared by [`crate::import::normalize_header`]
    /// through `matches`), if this file's folders give one.
    #[must_use]
    pub fn value_of(&self, matches: &dyn Fn(&str) -> bool) -> Option<Option<&str>> {
        self.partition
            .iter()
            .find(|(k, _)| matches(k))
            .map(|(_, v)| v.as_deref())
    }
}

/// True when `path` names a Parquet market: a `.parquet` file or a folder holding some.
#[must_use]
pub fn is_parquet_market(path: &Path) -> bool {
    if path.is_dir() {
        return true;
    }
    path.extension()
        .is_some_and(|e| e.eq_ignore_ascii_case("parquet"))
}

/// Every Parquet file of the dataset at `root` (a file or a folder), sorted by relative path.
/// Hidden files and engines' bookkeeping (`.crc`, `_SUCCESS`, names starting with `_` or `.`)
/// are passed over.
pub fn part_files(root: &Path) -> std::io::Result<Vec<PartFile>> {
    if !root.is_dir() {
        // A single file: read it whatever its metadata says it is; the reader tells.
        std::fs::metadata(root)?;
        let name = super::file_label(root);
        // A file taken from a partitioned folder keeps the values its folders give it.
        let partition = folder_partition(root, 1);
        return Ok(vec![PartFile {
            path: root.to_owned(),
            relative: name,
            partition,
        }]);
    }
    let mut found = Vec::new();
    walk(root, root, &mut found)?;
    // A folder opened inside a partitioned dataset (`lake/make=Orvane/model=Kestrel`) keeps the
    // values its own folders give.
    let above = folder_partition(root, 0);
    if !above.is_empty() {
        for f in &mut found {
            f.partition.splice(0..0, above.iter().cloned());
        }
    }
    found.sort_by(|a: &PartFile, b| a.relative.cmp(&b.relative));
    Ok(found)
}

/// The `key=value` pairs of the folders a path sits in, outermost first, read upward from the
/// path (after skipping `skip` components) until a folder is not of that form.
fn folder_partition(path: &Path, skip: usize) -> Vec<(String, Option<String>)> {
    let mut pairs: Vec<(String, Option<String>)> = path
        .ancestors()
        .skip(skip)
        .map_while(|dir| {
            let folder = dir.file_name()?.to_string_lossy().into_owned();
            let (k, v) = folder.split_once('=')?;
            Some((unescape(k), (v != NULL_PARTITION).then(|| unescape(v))))
        })
        .collect();
    pairs.reverse();
    pairs
}

fn walk(root: &Path, dir: &Path, found: &mut Vec<PartFile>) -> std::io::Result<()> {
    let mut entries: Vec<_> = std::fs::read_dir(dir)?.collect::<Result<_, _>>()?;
    entries.sort_by_key(std::fs::DirEntry::file_name);
    for entry in entries {
        let name = entry.file_name().to_string_lossy().into_owned();
        if name.starts_with('.') || name.starts_with('_') {
            continue;
        }
        let path = entry.path();
        if entry.file_type()?.is_dir() || path.is_dir() {
            walk(root, &path, found)?;
        } else if name.to_ascii_lowercase().ends_with(".parquet") {
            let relative_path = path.strip_prefix(root).unwrap_or(&path);
            let parts: Vec<String> = relative_path
                .components()
                .map(|c| c.as_os_str().to_string_lossy().into_owned())
                .collect();
            let partition = parts[..parts.len().saturating_sub(1)]
                .iter()
                .filter_map(|folder| {
                    let (k, v) = folder.split_once('=')?;
                    let value = (v != NULL_PARTITION).then(|| unescape(v));
                    Some((unescape(k), value))
                })
                .collect();
            found.push(PartFile {
                path,
                relative: parts.join("/"),
                partition,
            });
        }
    }
    Ok(())
}

/// The characters analytical engines escape in a partition folder's name, as `%XX`: controls,
/// the path and key separators, quotes, wildcards and `%` itself.
fn must_escape(c: char) -> bool {
    c.is_control()
        || matches!(
            c,
            '"' | '#' | '%' | '\'' | '*' | '/' | ':' | '=' | '?' | '\\' | '{' | '[' | ']' | '^'
        )
}

/// A partition value written as a folder name: `%XX` for each escaped byte.
#[must_use]
pub fn escape(value: &str) -> String {
    let mut out = String::with_capacity(value.len());
    for c in value.chars() {
        if must_escape(c) {
            let mut buf = [0u8; 4];
            for b in c.encode_utf8(&mut buf).bytes() {
                let _ = write!(out, "%{b:02X}");
            }
        } else {
            out.push(c);
        }
    }
    out
}

/// A folder name's `%XX` escapes undone; text that is not a valid escape is kept as written.
#[must_use]
pub fn unescape(text: &str) -> String {
    let bytes = text.as_bytes();
    let mut out = Vec::with_capacity(bytes.len());
    let mut i = 0;
    while i < bytes.len() {
        if bytes[i] == b'%'
            && let Some(hex) = text.get(i + 1..i + 3)
            && let Ok(b) = u8::from_str_radix(hex, 16)
        {
            out.push(b);
            i += 3;
            continue;
        }
        out.push(bytes[i]);
        i += 1;
    }
    String::from_utf8(out).unwrap_or_else(|_| text.to_owned())
}

/// The indexes (into `files`) of the files the makes and models in `wanted` need (every file
/// when `wanted` is empty): those whose `make` and `model` partitions (when the layout has them)
/// name one of them, compared without case or spacing; files without such folders may hold any
/// model and are always read.
#[must_use]
pub fn files_for(
    files: &[PartFile],
    is_make: &dyn Fn(&str) -> bool,
    is_model: &dyn Fn(&str) -> bool,
    wanted: &[(String, String)],
) -> Vec<usize> {
    if wanted.is_empty() {
        return (0..files.len()).collect();
    }
    let keys: Vec<(String, String)> = wanted
        .iter()
        .map(|(make, model)| (name_key(make), name_key(model)))
        .collect();
    let fits = |v: Option<Option<&str>>, want: &str| match v {
        None => true,
        Some(None) => false,
        Some(Some(v)) => name_key(v) == want,
    };
    (0..files.len())
        .filter(|&i| {
            let f = &files[i];
            keys.iter().any(|(make, model)| {
                fits(f.value_of(is_make), make) && fits(f.value_of(is_model), model)
            })
        })
        .collect()
}

/// The makes and models the partition folders name, with their rows (from the files' footers):
/// for a message that says what the dataset does hold.
#[must_use]
pub fn partition_list(
    files: &[PartFile],
    rows: &[u64],
    is_make: &dyn Fn(&str) -> bool,
    is_model: &dyn Fn(&str) -> bool,
) -> String {
    let mut by: BTreeMap<(String, String), u64> = BTreeMap::new();
    for (f, n) in files.iter().zip(rows) {
        let name = |v: Option<Option<&str>>| match v {
            Some(Some(v)) => v.to_owned(),
            Some(None) => "(none)".to_owned(),
            None => "(any)".to_owned(),
        };
        *by.entry((name(f.value_of(is_make)), name(f.value_of(is_model))))
            .or_default() += n;
    }
    by.into_iter()
        .map(|((make, model), n)| {
            format!("{make} {model} ({})", crate::format::thousands(n as f64))
        })
        .collect::<Vec<_>>()
        .join(", ")
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn partition_values_survive_escaping() {
        for value in [
            "Quellmark",
            "Ardent/Vale",
            "50% off",
            "a=b:c",
            "Évreux #2",
            "x\ty",
        ] {
            let folder = escape(value);
            assert!(!folder.contains('/') && !folder.contains('='), "{folder}");
            assert_eq!(unescape(&folder), value);
        }
        // Written by hand the way engines escape: %2F is "/", a stray % stays.
        assert_eq!(unescape("Ardent%2FVale"), "Ardent/Vale");
        assert_eq!(unescape("100%"), "100%");
        assert_eq!(unescape("%zz"), "%zz");
    }

    #[test]
    fn a_partitioned_folder_lists_its_files_and_partitions_in_order() {
        let root = std::env::temp_dir().join(format!("comptrail-ds-{}", std::process::id()));
        let _ = std::fs::remove_dir_all(&root);
        for (dir, file) in [
            ("make=Quellmark/model=Tessel", "part-1.parquet"),
            ("make=Quellmark/model=Tessel", "part-0.parquet"),
            ("make=Ardent/model=Vale%2FX", "data_0.parquet"),
            (
                "make=__HIVE_DEFAULT_PARTITION__/model=Orb",
                "data_0.parquet",
            ),
            ("make=Ardent/model=Vale%2FX", "_SUCCESS"),
            ("make=Ardent/model=Vale%2FX", ".part.crc"),
        ] {
            std::fs::create_dir_all(root.join(dir)).unwrap_or_else(|e| panic!("{e}"));
            std::fs::write(root.join(dir).join(file), b"x").unwrap_or_else(|e| panic!("{e}"));
        }
        let files = part_files(&root).unwrap_or_else(|e| panic!("{e}"));
        std::fs::remove_dir_all(&root).ok();
        let relative: Vec<&str> = files.iter().map(|f| f.relative.as_str()).collect();
        assert_eq!(
            relative,
            [
                "make=Ardent/model=Vale%2FX/data_0.parquet",
                "make=Quellmark/model=Tessel/part-0.parquet",
                "make=Quellmark/model=Tessel/part-1.parquet",
                "make=__HIVE_DEFAULT_PARTITION__/model=Orb/data_0.parquet",
            ]
        );
        assert_eq!(
            files[0].partition,
            [
                ("make".to_owned(), Some("Ardent".to_owned())),
                ("model".to_owned(), Some("Vale/X".to_owned()))
            ]
        );
        assert_eq!(files[3].partition[0].1, None);
        let is = |name: &'static str| move |k: &str| k == name;
        let want = |make: &str, model: &str| vec![(make.to_owned(), model.to_owned())];
        let chosen = files_for(
            &files,
            &is("make"),
            &is("model"),
            &want("QUELLMARK", "  tessel"),
        );
        assert_eq!(chosen.len(), 2);
        assert!(chosen.iter().all(|&i| files[i].relative.contains("Tessel")));
        let none = files_for(&files, &is("make"), &is("model"), &want("Orb", "Orb"));
        assert!(none.is_empty(), "a null make is no make");
        assert_eq!(files_for(&files, &is("make"), &is("model"), &[]).len(), 4);
        assert_eq!(
            partition_list(&files, &[5, 1000, 2000, 7], &is("make"), &is("model")),
            "(none) Orb (7), Ardent Vale/X (5), Quellmark Tessel (3,000)"
        );
    }
}
