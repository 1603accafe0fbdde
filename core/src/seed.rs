//! The seed catalogue: the sequence data the constructions use, embedded at compile time.
//!
//! One idea: data is plain text with its provenance on every line, checked before use. The files
//! under `seed-catalogue/sequences/` are compiled into this crate with `include_str!` (so core
//! still does no I/O), parsed once, and every entry is checked against its defining identity
//! ([`crate::construct::sequences`]). An entry that fails its identity is never used; the test
//! suite requires that there are none.
//!
//! The grammar, one entry per line (`#` starts a comment line, blank lines are skipped):
//!
//! ```text
//! KIND key=value key=value ... | provenance text
//! ```
//!
//! where the sequences are written with `+`, `-` (and `0` for T-sequences), and the provenance
//! says who or what produced the entry, how, and when.

use crate::construct::sequences::{
    from_text, BaseSequences, GolayPair, GsQuadruple, TSequences, TurynType, Williamson,
};
use std::sync::OnceLock;

/// One recorded entry and where it came from.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct Entry<T> {
    /// The data.
    pub data: T,
    /// Who or what produced it, how, and when.
    pub provenance: String,
    /// The file and line it was read from.
    pub source: String,
}

/// Everything in the seed catalogue, checked.
#[derive(Clone, Debug, Default)]
pub struct SeedCatalogue {
    pub williamson: Vec<Entry<Williamson>>,
    pub golay: Vec<Entry<GolayPair>>,
    pub base: Vec<Entry<BaseSequences>>,
    pub turyn_type: Vec<Entry<TurynType>>,
    pub t_sequences: Vec<Entry<TSequences>>,
    pub goethals_seidel: Vec<Entry<GsQuadruple>>,
    /// Lines that could not be read or failed their identity: (source, message).
    pub rejected: Vec<(String, String)>,
}

/// The embedded files: (name, text).
pub const FILES: &[(&str, &str)] = &[
    (
        "williamson.txt",
        include_str!("../../seed-catalogue/sequences/williamson.txt"),
    ),
    (
        "golay.txt",
        include_str!("../../seed-catalogue/sequences/golay.txt"),
    ),
    (
        "base.txt",
        include_str!("../../seed-catalogue/sequences/base.txt"),
    ),
    (
        "turyn-type.txt",
        include_str!("../../seed-catalogue/sequences/turyn-type.txt"),
    ),
    (
        "t-sequences.txt",
        include_str!("../../seed-catalogue/sequences/t-sequences.txt"),
    ),
    (
        "goethals-seidel.txt",
        include_str!("../../seed-catalogue/sequences/goethals-seidel.txt"),
    ),
];

/// The embedded seed catalogue, parsed and checked once.
pub fn embedded() -> &'static SeedCatalogue {
    static CAT: OnceLock<SeedCatalogue> = OnceLock::new();
    CAT.get_or_init(|| {
        let mut cat = SeedCatalogue::default();
        for (name, text) in FILES {
            cat.add_text(name, text);
        }
        cat
    })
}

impl SeedCatalogue {
    /// Parses `text` (named `name` in messages) and adds its valid entries.
    pub fn add_text(&mut self, name: &str, text: &str) {
        for (k, line) in text.lines().enumerate() {
            let line = line.trim();
            if line.is_empty() || line.starts_with('#') {
                continue;
            }
            let source = format!("{name}:{}", k + 1);
            if let Err(msg) = self.add_line(line, &source) {
                self.rejected.push((source, msg));
            }
        }
    }

    fn add_line(&mut self, line: &str, source: &str) -> Result<(), String> {
        let (head, provenance) = match line.split_once('|') {
            Some((h, p)) => (h.trim(), p.trim().to_string()),
            None => return Err("no provenance: every entry needs `| who, how, when`".into()),
        };
        if provenance.is_empty() {
            return Err("empty provenance".into());
        }
        let mut words = head.split_whitespace();
        let kind = words.next().ok_or("empty entry")?;
        let mut fields = Vec::new();
        for w in words {
            let (k, v) = w
                .split_once('=')
                .ok_or_else(|| format!("expected key=value, found `{w}`"))?;
            fields.push((k, v));
        }
        let get = |key: &str| -> Result<Vec<i8>, String> {
            let v = fields
                .iter()
                .find(|(k, _)| *k == key)
                .map(|(_, v)| *v)
                .ok_or_else(|| format!("missing `{key}=`"))?;
            from_text(v).map_err(|i| format!("`{key}`: bad character at position {}", i + 1))
        };
        let source = source.to_string();
        macro_rules! push {
            ($list:ident, $data:expr, $what:literal) => {{
                let data = $data;
                if !data.is_valid() {
                    return Err(concat!("fails the defining identity of ", $what).into());
                }
                self.$list.push(Entry {
                    data,
                    provenance,
                    source,
                });
            }};
        }
        match kind {
            "williamson" => push!(
                williamson,
                Williamson {
                    a: get("a")?,
                    b: get("b")?,
                    c: get("c")?,
                    d: get("d")?
                },
                "Williamson matrices"
            ),
            "golay" => push!(
                golay,
                GolayPair {
                    a: get("a")?,
                    b: get("b")?
                },
                "a Golay pair"
            ),
            "base" => push!(
                base,
                BaseSequences {
                    a: get("a")?,
                    b: get("b")?,
                    c: get("c")?,
                    d: get("d")?
                },
                "base sequences"
            ),
            "turyn" => push!(
                turyn_type,
                TurynType {
                    a: get("a")?,
                    b: get("b")?,
                    c: get("c")?,
                    d: get("d")?
                },
                "Turyn-type sequences"
            ),
            "tseq" => push!(
                t_sequences,
                TSequences {
                    t: [get("t1")?, get("t2")?, get("t3")?, get("t4")?]
                },
                "T-sequences"
            ),
            "gs" => push!(
                goethals_seidel,
                GsQuadruple {
                    a: [get("a")?, get("b")?, get("c")?, get("d")?]
                },
                "a Goethals–Seidel quadruple"
            ),
            other => return Err(format!("unknown kind `{other}`")),
        }
        Ok(())
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn embedded_catalogue_is_clean() {
        let cat = embedded();
        assert!(
            cat.rejected.is_empty(),
            "rejected seed entries: {:?}",
            cat.rejected
        );
        assert!(!cat.williamson.is_empty());
    }

    #[test]
    fn bad_lines_are_rejected_with_their_place() {
        let mut cat = SeedCatalogue::default();
        cat.add_text(
            "t.txt",
            "# c\nwilliamson a=+++ b=+++ c=+-- d=+-- | x\ngolay a=++ b=+-\ngolay a=+x b=+- | y\n",
        );
        assert_eq!(cat.rejected.len(), 3);
        assert_eq!(cat.rejected[0].0, "t.txt:2");
        assert!(cat.rejected[1].1.contains("provenance"));
        assert!(cat.rejected[2].1.contains("position 2"));
    }
}
