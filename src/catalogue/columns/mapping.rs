//! How one catalogue's header becomes the canonical fields: the user's
//! column-map file (`--columns`), the built-in synonyms and stated units,
//! and where each field came from (`ColumnUse`, for `summary`).

use std::collections::BTreeMap;
use std::path::Path;

use serde::Serialize;

use super::{FIELDS, Field, REQUIRED, header_unit};
use crate::catalogue::LoadError;

/// The user's column map: canonical field → their header, from `--columns`.
#[derive(Clone, Debug, Default)]
pub struct ColumnMap {
    pub fields: BTreeMap<Field, String>,
}

impl ColumnMap {
    /// Reads a TOML column-map file: `canonical_field = "their header"` lines.
    pub fn from_file(path: &Path) -> Result<ColumnMap, LoadError> {
        let text = std::fs::read_to_string(path).map_err(|source| LoadError::Io {
            path: path.display().to_string(),
            source,
        })?;
        ColumnMap::from_toml(&text, &path.display().to_string())
    }

    pub fn from_toml(text: &str, path: &str) -> Result<ColumnMap, LoadError> {
        let bad = |line: usize, message: String| LoadError::ColumnMap {
            path: path.to_string(),
            line,
            message,
        };
        let table: toml::Table = text.parse().map_err(|e: toml::de::Error| {
            let line = e.span().map_or(0, |s| line_of(text, s.start));
            bad(line, e.message().to_string())
        })?;
        let mut map = ColumnMap::default();
        for (key, value) in &table {
            let line = find_key_line(text, key);
            let field = Field::from_name(key).ok_or_else(|| {
                bad(
                    line,
                    format!(
                        "`{key}` is not a canonical field; known: {}",
                        FIELDS.map(Field::name).join(", ")
                    ),
                )
            })?;
            let header = value
                .as_str()
                .ok_or_else(|| bad(line, format!("`{key}` must be a string naming a header")))?;
            map.fields.insert(field, header.to_string());
        }
        Ok(map)
    }
}

fn line_of(text: &str, byte: usize) -> usize {
    text[..byte.min(text.len())].matches('\n').count() + 1
}

fn find_key_line(text: &str, key: &str) -> usize {
    text.lines()
        .position(|l| {
            let l = l.trim_start();
            let l = l.strip_prefix('"').unwrap_or(l);
            l.starts_with(key)
        })
        .map_or(0, |i| i + 1)
}

/// Where one canonical field comes from in this catalogue.
#[derive(Clone, Debug, Serialize)]
pub struct ColumnUse {
    pub field: &'static str,
    pub header: String,
    pub index: usize,
    pub unit: String,
    /// How the mapping was chosen: `synonym`, `column map`, or a unit note.
    pub how: String,
}

impl ColumnUse {
    /// A column whose header names `field`, which another column feeds:
    /// kept as an extra column (a second star id ties the star ids of one
    /// host: `checks::second_ids`).
    pub fn shadowed(index: usize, header: &str, field: Field) -> ColumnUse {
        let how = if field == Field::Star {
            "also names the star, which another column feeds; kept as an extra column, a second \
             star id: star ids whose rows give one value in it are one host, and a false \
             positive at one holds the other (docs/science.md §3.4)"
                .to_string()
        } else {
            format!("also names {field}, which another column feeds; kept as an extra column")
        };
        ColumnUse {
            field: "",
            header: header.to_string(),
            index,
            unit: String::new(),
            how,
        }
    }
}

/// Whether a depth column's header states no unit or one the loader
/// reads (ppm, %, ppt, fraction; not `mmag`).
fn depth_unit_read(header: &str) -> bool {
    header_unit(header)
        .1
        .is_none_or(|u| crate::catalogue::units::depth_unit(&u).is_some())
}

/// The header of one catalogue resolved onto fields.
#[derive(Clone, Debug)]
pub struct Mapping {
    /// For each field, the column index that feeds it.
    pub by_field: BTreeMap<Field, usize>,
    /// Columns that feed no field, kept as extra text fields: (index, header).
    pub extras: Vec<(usize, String)>,
    /// Columns that matched a field already taken: (index, header, field).
    pub shadowed: Vec<(usize, String, Field)>,
}

impl Mapping {
    pub fn resolve(path: &str, header: &[String], map: &ColumnMap) -> Result<Mapping, LoadError> {
        let mut by_field = BTreeMap::new();
        for (field, wanted) in &map.fields {
            let index = header
                .iter()
                .position(|h| h.trim() == wanted.trim())
                .or_else(|| {
                    header
                        .iter()
                        .position(|h| h.trim().eq_ignore_ascii_case(wanted.trim()))
                })
                .ok_or_else(|| LoadError::MappedColumnMissing {
                    path: path.to_string(),
                    field: *field,
                    header: wanted.clone(),
                    available: header.join(", "),
                })?;
            by_field.insert(*field, index);
        }
        let mut extras = Vec::new();
        let mut shadowed = Vec::new();
        for (index, h) in header.iter().enumerate() {
            if by_field.values().any(|i| *i == index) {
                continue;
            }
            match Field::from_header(h) {
                Some(field) if !by_field.contains_key(&field) => {
                    by_field.insert(field, index);
                }
                // Two depths, the first in a unit not read (ExoFOP's
                // `Depth (mmag)` before `Depth (ppm)`): the readable one.
                Some(Field::DepthPpm)
                    if !map.fields.contains_key(&Field::DepthPpm)
                        && !depth_unit_read(&header[by_field[&Field::DepthPpm]])
                        && depth_unit_read(h) =>
                {
                    let first = by_field.insert(Field::DepthPpm, index).unwrap_or(index);
                    shadowed.push((first, header[first].clone(), Field::DepthPpm));
                    extras.push((first, header[first].clone()));
                    extras.sort_unstable_by_key(|(i, _)| *i);
                }
                Some(field) => {
                    shadowed.push((index, h.clone(), field));
                    extras.push((index, h.clone()));
                }
                None => extras.push((index, h.clone())),
            }
        }
        // The disposition is read as text from the extra columns, where it
        // stays as the file gave it.
        if let Some(&index) = by_field.get(&Field::Disposition)
            && !extras.iter().any(|(i, _)| *i == index)
        {
            extras.push((index, header[index].clone()));
            extras.sort_unstable_by_key(|(i, _)| *i);
        }
        for field in REQUIRED {
            if !by_field.contains_key(&field) {
                return Err(LoadError::MissingColumn {
                    path: path.to_string(),
                    field,
                    synonyms: field.synonyms().join(", "),
                    header: header.join(", "),
                });
            }
        }
        Ok(Mapping {
            by_field,
            extras,
            shadowed,
        })
    }
}
