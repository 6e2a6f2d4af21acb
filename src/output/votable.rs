//! Writing a table as a VOTable (IVOA VOTable 1.4, TABLEDATA serialisation):
//! one RESOURCE, INFO elements for the provenance, a FIELD per column with
//! its datatype and unit, and the rows as TR/TD. Writing only; catalogues
//! are read through an XML crate (`catalogue/formats.rs`).

use std::io::{self, Write};

/// The VOTable datatype of a column.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Kind {
    Text,
    Double,
    Long,
    Boolean,
}

impl Kind {
    fn attributes(self) -> &'static str {
        match self {
            Kind::Text => r#"datatype="char" arraysize="*""#,
            Kind::Double => r#"datatype="double""#,
            Kind::Long => r#"datatype="long""#,
            Kind::Boolean => r#"datatype="boolean""#,
        }
    }
}

/// A column: name, datatype, unit (VOUnits; empty for none) and description.
#[derive(Clone, Debug)]
pub struct Column {
    pub name: String,
    pub kind: Kind,
    pub unit: &'static str,
    pub description: String,
}

/// Escapes the five XML special characters; drops the control characters
/// XML 1.0 cannot carry at all (XML 1.0 §2.2).
pub fn escape(text: &str, out: &mut String) {
    for ch in text.chars() {
        match ch {
            '&' => out.push_str("&amp;"),
            '<' => out.push_str("&lt;"),
            '>' => out.push_str("&gt;"),
            '"' => out.push_str("&quot;"),
            '\'' => out.push_str("&apos;"),
            '\t' | '\n' | '\r' => out.push(ch),
            c if (c as u32) < 0x20 || c == '\u{fffe}' || c == '\u{ffff}' => {}
            c => out.push(c),
        }
    }
}

/// Writes the document head: the table's description, the provenance as
/// INFO elements (name, value) and the FIELD list, up to the open TABLEDATA.
pub fn begin(
    out: &mut dyn Write,
    description: &str,
    info: &[(String, String)],
    columns: &[Column],
) -> io::Result<()> {
    let mut s = String::new();
    s.push_str("<?xml version=\"1.0\" encoding=\"UTF-8\"?>\n");
    s.push_str(
        "<VOTABLE version=\"1.4\" xmlns=\"http://www.ivoa.net/xml/VOTable/v1.3\">\n<RESOURCE>\n<DESCRIPTION>",
    );
    escape(description, &mut s);
    s.push_str("</DESCRIPTION>\n");
    for (name, value) in info {
        s.push_str("<INFO name=\"");
        escape(name, &mut s);
        s.push_str("\" value=\"");
        escape(value, &mut s);
        s.push_str("\"/>\n");
    }
    s.push_str("<TABLE>\n");
    for c in columns {
        s.push_str("<FIELD name=\"");
        escape(&c.name, &mut s);
        s.push_str("\" ");
        s.push_str(c.kind.attributes());
        if !c.unit.is_empty() {
            s.push_str(" unit=\"");
            escape(c.unit, &mut s);
            s.push('"');
        }
        if c.description.is_empty() {
            s.push_str("/>\n");
        } else {
            s.push_str("><DESCRIPTION>");
            escape(&c.description, &mut s);
            s.push_str("</DESCRIPTION></FIELD>\n");
        }
    }
    s.push_str("<DATA><TABLEDATA>\n");
    out.write_all(s.as_bytes())
}

/// Writes one row of already formatted cells.
pub fn row(out: &mut dyn Write, cells: &[String], scratch: &mut String) -> io::Result<()> {
    scratch.clear();
    scratch.push_str("<TR>");
    for c in cells {
        scratch.push_str("<TD>");
        escape(c, scratch);
        scratch.push_str("</TD>");
    }
    scratch.push_str("</TR>\n");
    out.write_all(scratch.as_bytes())
}

/// Closes the document.
pub fn end(out: &mut dyn Write) -> io::Result<()> {
    out.write_all(b"</TABLEDATA></DATA>\n</TABLE>\n</RESOURCE>\n</VOTABLE>\n")
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn escapes_markup_and_drops_what_xml_cannot_hold() {
        // XML 1.0 §2.4 (the five predefined entities) and §2.2 (allowed chars).
        let mut s = String::new();
        escape("a<b & \"c\" 'd' >\u{1}e", &mut s);
        assert_eq!(s, "a&lt;b &amp; &quot;c&quot; &apos;d&apos; &gt;e");
    }
}
