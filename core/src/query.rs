//! Reading what a person types into the registry's look-up box.
//!
//! One box takes every question the registry answers: an order ("92", "order 92", `2^12`, a
//! matrix shape "12x12"), a dimension for a fast rotation ("dimension 3584"), a number of
//! strata for balanced repeated replication ("40 strata"), a number of factors for a two-level
//! screening design ("19 factors"), or a matrix id or the start of one. [`read`] turns the
//! text into a [`Lookup`] and a sentence saying what it understood, or refuses with a sentence
//! saying why; it never guesses digits out of text it cannot read (`3.5` is not 35, `-4` is
//! not 4, `1e6` is a million).
//!
//! The web page and the server both call this, so the box means the same thing everywhere.

use crate::id::is_id;

/// What a number in the box stands for.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash)]
pub enum Kind {
    /// The order n of an n×n matrix.
    Order,
    /// A dimension d to be written as 2^a·m for a fast transform.
    Dimension,
    /// A number of strata for balanced repeated replication.
    Strata,
    /// A number of two-level factors for a screening design.
    Factors,
}

impl Kind {
    /// The word for the kind, as a URL query key and in sentences.
    pub fn key(self) -> &'static str {
        match self {
            Kind::Order => "order",
            Kind::Dimension => "dimension",
            Kind::Strata => "strata",
            Kind::Factors => "factors",
        }
    }

    /// The inverse of [`Kind::key`].
    pub fn from_key(key: &str) -> Option<Kind> {
        [Kind::Order, Kind::Dimension, Kind::Strata, Kind::Factors]
            .into_iter()
            .find(|k| k.key() == key)
    }
}

/// A question the box understood.
#[derive(Clone, Debug, PartialEq, Eq)]
pub enum Lookup {
    /// A positive whole number and what it counts.
    Number { kind: Kind, value: u64 },
    /// A complete matrix id (64 lowercase hex digits).
    Id(String),
    /// The start of a matrix id (8 to 63 hex digits), as order pages show them.
    IdPrefix(String),
}

/// A question and the sentence that says how the box read it.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct Understood {
    pub lookup: Lookup,
    pub said: String,
}

/// The largest number the box accepts (the API's own limit on orders).
pub const MAX_VALUE: u64 = 1_000_000_000_000_000;

const HINT: &str = "Type a whole number such as 92, optionally with what it counts \
(19 factors, 40 strata, dimension 3584), or a matrix id.";

/// The smallest order n ≥ k + 1 that is a multiple of 4: the number of runs of a
/// Plackett–Burman screening design for k two-level factors (common practice: a design from a
/// Hadamard matrix of order n has n − 1 columns; Plackett and Burman, Biometrika 33, 1946).
pub fn screening_runs(k: u64) -> u64 {
    (k / 4 + 1).saturating_mul(4)
}

/// Reads the box. `chosen` is what a bare number stands for (the page's "read the number as"
/// choice); a word in the text overrides it.
pub fn read(text: &str, chosen: Kind) -> Result<Understood, String> {
    let t = join_operators(&normalise(text));
    if t.is_empty() {
        return Err(HINT.into());
    }
    if let Some(id) = id_like(&t) {
        return Ok(id);
    }
    let mut kind_word: Option<(Kind, String)> = None;
    let mut numbers: Vec<String> = Vec::new();
    for tok in tokens(&t) {
        if starts_numeric(&tok) {
            numbers.push(tok);
            continue;
        }
        match word_kind(&tok) {
            Some(Word::Filler) => {}
            Some(Word::Kind(k)) => match &kind_word {
                Some((other, w)) if *other != k => {
                    return Err(format!(
                        "“{w}” and “{tok}” ask different questions: ask one at a time."
                    ))
                }
                _ => kind_word = Some((k, tok)),
            },
            None => {
                return Err(format!(
                    "The box could not read “{}”. {HINT}",
                    shorten(&tok)
                ))
            }
        }
    }
    let expr = match numbers.as_slice() {
        [] => return Err(format!("There is no number in “{}”. {HINT}", shorten(&t))),
        [one] => one.clone(),
        many => {
            return Err(format!(
                "“{}” holds {} numbers; the box reads one at a time.",
                shorten(&many.join(" ")),
                many.len()
            ))
        }
    };
    let (value, how, square) = number(&expr)?;
    let kind = if square {
        Kind::Order
    } else {
        kind_word.map(|(k, _)| k).unwrap_or(chosen)
    };
    if value == 0 {
        return Err(match kind {
            Kind::Order => "0 is not an order: orders start at 1.".into(),
            Kind::Dimension => "0 is not a dimension: dimensions start at 1.".into(),
            Kind::Strata => "0 strata need no replicate weights: the count starts at 1.".into(),
            Kind::Factors => "0 factors need no design: the count starts at 1.".into(),
        });
    }
    let how = how.map(|h| format!("{h}; ")).unwrap_or_default();
    let said = match kind {
        Kind::Order => format!(
            "Read {how}as order {value}: does a {value}×{value} Hadamard matrix exist, and how is it built?"
        ),
        Kind::Dimension => format!(
            "Read {how}as dimension {value}: how to write {value} = 2^a·m for a fast Hadamard rotation."
        ),
        Kind::Strata => format!(
            "Read {how}as {value} strat{}: replicate weights for balanced repeated replication.",
            if value == 1 { "um" } else { "a" }
        ),
        Kind::Factors => format!(
            "Read {how}as {value} factor{}: a two-level screening design (Plackett–Burman).",
            if value == 1 { "" } else { "s" }
        ),
    };
    Ok(Understood {
        lookup: Lookup::Number { kind, value },
        said,
    })
}

fn shorten(s: &str) -> String {
    if s.chars().count() > 40 {
        format!("{}…", s.chars().take(40).collect::<String>())
    } else {
        s.to_string()
    }
}

/// Lowercase, with the typographic minus, dashes, times sign and `**` spelled plainly.
fn normalise(text: &str) -> String {
    text.trim()
        .to_lowercase()
        .replace(['\u{2212}', '\u{2013}', '\u{2012}'], "-")
        .replace('\u{00d7}', "x")
        .replace("**", "^")
        .replace(['\u{00a0}', '\u{202f}'], " ")
}

/// A full id, an id prefix, or a link to a matrix page.
fn id_like(t: &str) -> Option<Understood> {
    let mut s = t;
    if let Some(i) = s.rfind("/m/") {
        s = &s[i + 3..];
    }
    let s = s
        .trim_end_matches('/')
        .trim_end_matches('…')
        .trim_end_matches("...");
    if is_id(s) {
        return Some(Understood {
            lookup: Lookup::Id(s.to_string()),
            said: "Read as a matrix id.".into(),
        });
    }
    let hex = s.len() >= 8 && s.len() < 64 && s.bytes().all(|b| b.is_ascii_hexdigit());
    let has_letter = s.bytes().any(|b| b.is_ascii_alphabetic());
    // `1e12345` is a number written with an exponent, not the start of an id.
    let scientific = s.bytes().filter(|&b| b == b'e').count() == 1
        && s.bytes().all(|b| b.is_ascii_digit() || b == b'e')
        && s.split('e').nth(1).is_some_and(|e| e.len() <= 2);
    if hex && has_letter && !scientific {
        return Some(Understood {
            lookup: Lookup::IdPrefix(s.to_string()),
            said: format!("Read as the start of a matrix id: {s}…"),
        });
    }
    None
}

/// Splits on spaces, `=` and `:`, and splits `19factors` into `19` and `factors`.
fn tokens(t: &str) -> Vec<String> {
    let mut out = Vec::new();
    for raw in t.split(|c: char| c.is_whitespace() || c == '=' || c == ':' || c == '?') {
        if raw.is_empty() {
            continue;
        }
        // A number glued to a word of two or more letters ("19factors", "40strata").
        let split = raw
            .char_indices()
            .find(|&(i, c)| {
                c.is_alphabetic() && i > 0 && raw[i..].chars().take(2).all(char::is_alphabetic)
            })
            .map(|(i, _)| i);
        match split {
            Some(i) if starts_numeric(raw) => {
                out.push(raw[..i].to_string());
                out.push(raw[i..].to_string());
            }
            _ => out.push(raw.to_string()),
        }
    }
    out
}

fn starts_numeric(tok: &str) -> bool {
    tok.chars()
        .next()
        .is_some_and(|c| c.is_ascii_digit() || c == '-' || c == '+' || c == '.')
}

/// Joins `12 x 12` and `2 ^ 12` typed with spaces into one expression.
fn join_operators(t: &str) -> String {
    let chars: Vec<char> = t.chars().collect();
    let op = |c: char| matches!(c, 'x' | '^' | '*');
    let mut out: Vec<char> = Vec::with_capacity(chars.len());
    for (i, &c) in chars.iter().enumerate() {
        if c.is_whitespace() {
            let prev = out.iter().rev().copied().find(|c| !c.is_whitespace());
            let next = chars[i..].iter().copied().find(|c| !c.is_whitespace());
            let before_prev = out
                .iter()
                .rev()
                .copied()
                .filter(|c| !c.is_whitespace())
                .nth(1);
            let joins = match (prev, next) {
                (Some(p), Some(n)) if p.is_ascii_digit() && op(n) => true,
                (Some(p), Some(n)) if op(p) && n.is_ascii_digit() => {
                    before_prev.is_some_and(|b| b.is_ascii_digit())
                }
                _ => false,
            };
            if joins {
                continue;
            }
        }
        out.push(c);
    }
    out.into_iter().collect()
}

enum Word {
    Kind(Kind),
    Filler,
}

fn word_kind(w: &str) -> Option<Word> {
    let w = w.trim_matches(|c: char| c == ',' || c == '.' || c == '(' || c == ')');
    let k = match w {
        "order" | "orders" | "n" => Kind::Order,
        "dimension" | "dimensions" | "dim" | "d" | "size" | "rotation" | "transform" => {
            Kind::Dimension
        }
        "strata" | "stratum" | "brr" | "replicate" | "replicates" | "replication" => Kind::Strata,
        "factor" | "factors" | "screening" | "plackett" | "burman" | "plackett-burman" | "pb"
        | "variables" => Kind::Factors,
        "" | "a" | "an" | "the" | "of" | "for" | "with" | "hadamard" | "matrix" | "matrices"
        | "design" | "weights" | "k" | "two-level" | "balanced" | "repeated" => {
            return Some(Word::Filler)
        }
        _ => return None,
    };
    Some(Word::Kind(k))
}

/// A number expression: `4096`, `4,096`, `2^12`, `1e6`, `12x12`. Returns the value, a note on
/// how it was read when that was not plain digits, and whether it was a square shape.
fn number(expr: &str) -> Result<(u64, Option<String>, bool), String> {
    let e = expr.trim_matches(|c: char| c == '(' || c == ')');
    if let Some(rest) = e.strip_prefix('-') {
        return Err(format!(
            "−{rest} is negative: orders, dimensions and counts are positive whole numbers."
        ));
    }
    let e = e.strip_prefix('+').unwrap_or(e);
    if let Some((a, b)) = e.split_once('x').or_else(|| e.split_once('*')) {
        let (x, _, _) = number(a)?;
        let (y, _, _) = number(b)?;
        if x != y {
            return Err(format!(
                "{x}×{y} is not square: a Hadamard matrix is n×n, so type its order n."
            ));
        }
        return Ok((x, Some(format!("{x}×{y} as a matrix shape")), true));
    }
    if let Some((a, b)) = e.split_once('^') {
        let base = plain(a)?;
        let exp = plain(b)?;
        let v = u32::try_from(exp)
            .ok()
            .and_then(|x| base.checked_pow(x))
            .filter(|&v| v <= MAX_VALUE)
            .ok_or_else(too_large)?;
        return Ok((v, Some(format!("{base}^{exp} = {v}")), false));
    }
    if let Some((m, x)) = e.split_once('e') {
        let exp = plain(x)?;
        let (int, frac) = m.split_once('.').unwrap_or((m, ""));
        if int.is_empty() || !int.bytes().all(|b| b.is_ascii_digit()) {
            return Err(unreadable(e));
        }
        if !frac.bytes().all(|b| b.is_ascii_digit()) {
            return Err(unreadable(e));
        }
        let frac = frac.trim_end_matches('0');
        let shift = u32::try_from(exp)
            .ok()
            .filter(|&s| s >= frac.len() as u32)
            .ok_or_else(|| format!("{e} is not a whole number. {HINT}"))?;
        let digits = format!("{int}{frac}");
        let v = plain(&digits)?
            .checked_mul(
                10u64
                    .checked_pow(shift - frac.len() as u32)
                    .ok_or_else(too_large)?,
            )
            .filter(|&v| v <= MAX_VALUE)
            .ok_or_else(too_large)?;
        return Ok((v, Some(format!("{e} = {v}")), false));
    }
    if let Some((int, frac)) = e.split_once('.') {
        if !int.is_empty()
            && !frac.is_empty()
            && frac.bytes().all(|b| b == b'0')
            && int.bytes().all(|b| b.is_ascii_digit())
        {
            return Ok((plain(int)?, None, false));
        }
        return Err(format!(
            "{e} is not a whole number: orders, dimensions and counts are whole numbers."
        ));
    }
    if e.contains(',') {
        let groups: Vec<&str> = e.split(',').collect();
        let ok = groups[0].len() <= 3
            && !groups[0].is_empty()
            && groups[1..].iter().all(|g| g.len() == 3);
        if !ok {
            return Err(unreadable(e));
        }
        return Ok((plain(&groups.concat())?, None, false));
    }
    Ok((plain(e)?, None, false))
}

fn plain(s: &str) -> Result<u64, String> {
    if s.is_empty() || !s.bytes().all(|b| b.is_ascii_digit()) {
        return Err(unreadable(s));
    }
    s.parse::<u64>()
        .ok()
        .filter(|&v| v <= MAX_VALUE)
        .ok_or_else(too_large)
}

fn unreadable(s: &str) -> String {
    if s.is_empty() {
        format!("A number is missing. {HINT}")
    } else {
        format!("“{}” is not a number the box can read. {HINT}", shorten(s))
    }
}

fn too_large() -> String {
    "That number is too large: the registry answers up to 10^15.".into()
}

#[cfg(test)]
mod tests {
    use super::*;

    fn num(text: &str, chosen: Kind) -> (Kind, u64) {
        match read(text, chosen)
            .unwrap_or_else(|e| panic!("{text}: {e}"))
            .lookup
        {
            Lookup::Number { kind, value } => (kind, value),
            other => panic!("{text}: {other:?}"),
        }
    }

    fn refused(text: &str) -> String {
        read(text, Kind::Order).expect_err(text)
    }

    #[test]
    fn words_say_what_the_number_counts() {
        assert_eq!(num("19 factors", Kind::Order), (Kind::Factors, 19));
        assert_eq!(num("19factors", Kind::Order), (Kind::Factors, 19));
        assert_eq!(num("40 strata", Kind::Order), (Kind::Strata, 40));
        assert_eq!(num("dimension 3584", Kind::Order), (Kind::Dimension, 3584));
        assert_eq!(num("d=3584", Kind::Order), (Kind::Dimension, 3584));
        assert_eq!(num("order 92", Kind::Dimension), (Kind::Order, 92));
        assert_eq!(num("Plackett-Burman 11", Kind::Order), (Kind::Factors, 11));
        assert_eq!(
            num("a hadamard matrix of order 12", Kind::Strata),
            (Kind::Order, 12)
        );
    }

    #[test]
    fn a_bare_number_follows_the_choice() {
        assert_eq!(num("4096", Kind::Order), (Kind::Order, 4096));
        assert_eq!(num("4096", Kind::Dimension), (Kind::Dimension, 4096));
        assert_eq!(num(" 40 ", Kind::Strata), (Kind::Strata, 40));
        assert_eq!(num("4,096", Kind::Order), (Kind::Order, 4096));
    }

    #[test]
    fn expressions_are_evaluated_not_stripped_to_digits() {
        assert_eq!(num("2^12", Kind::Order), (Kind::Order, 4096));
        assert_eq!(num("2**12", Kind::Dimension), (Kind::Dimension, 4096));
        assert_eq!(num("1e6", Kind::Dimension), (Kind::Dimension, 1_000_000));
        assert_eq!(num("1.5e3", Kind::Order), (Kind::Order, 1500));
        assert_eq!(num("12x12", Kind::Dimension), (Kind::Order, 12));
        assert_eq!(num("12×12", Kind::Order), (Kind::Order, 12));
        assert_eq!(num("12 x 12", Kind::Strata), (Kind::Order, 12));
        assert_eq!(num("2 ^ 12", Kind::Order), (Kind::Order, 4096));
        assert_eq!(num("4.0", Kind::Order), (Kind::Order, 4));
        assert!(read("2^12", Kind::Order)
            .unwrap()
            .said
            .contains("2^12 = 4096"));
        assert!(read("12x12", Kind::Order)
            .unwrap()
            .said
            .contains("matrix shape"));
    }

    #[test]
    fn what_cannot_be_read_is_refused_with_a_reason() {
        assert!(refused("3.5").contains("not a whole number"));
        assert!(refused("-4").contains("negative"));
        assert!(refused("\u{2212}4").contains("negative"));
        assert!(refused("12x16").contains("not square"));
        assert!(refused("0").contains("start at 1"));
        assert!(refused("").contains("whole number"));
        assert!(refused("banana").contains("could not read"));
        assert!(refused("12 and 16").contains("could not read"));
        assert!(refused("12 16").contains("2 numbers"));
        assert!(refused("19 factors 40 strata").contains("different questions"));
        assert!(refused("2^80").contains("too large"));
        assert!(refused("99999999999999999999").contains("too large"));
        assert!(refused("1e-3").contains("not a number"));
        assert!(refused("1.25e1").contains("not a whole number"));
    }

    #[test]
    fn ids_and_their_prefixes() {
        let id = "a".repeat(64);
        assert_eq!(
            read(&id, Kind::Order).unwrap().lookup,
            Lookup::Id(id.clone())
        );
        let url = format!("http://127.0.0.1:8080/m/{id}");
        assert_eq!(
            read(&url, Kind::Order).unwrap().lookup,
            Lookup::Id(id.clone())
        );
        // The short form order pages show, with its ellipsis.
        assert_eq!(
            read("86c6e5789ed9a1b2…", Kind::Dimension).unwrap().lookup,
            Lookup::IdPrefix("86c6e5789ed9a1b2".into())
        );
        assert_eq!(
            read("86C6E578", Kind::Order).unwrap().lookup,
            Lookup::IdPrefix("86c6e578".into())
        );
        // Digits alone are a number, and so is an exponent.
        assert_eq!(num("12345678", Kind::Order), (Kind::Order, 12_345_678));
        assert_eq!(
            num("1e12", Kind::Dimension),
            (Kind::Dimension, 1_000_000_000_000)
        );
    }

    #[test]
    fn screening_runs_are_the_next_multiple_of_four_above_k() {
        // Plackett and Burman (1946): n runs, n a multiple of 4, take up to n − 1 factors.
        assert_eq!(screening_runs(11), 12);
        assert_eq!(screening_runs(19), 20);
        assert_eq!(screening_runs(12), 16);
        assert_eq!(screening_runs(1), 4);
        assert_eq!(screening_runs(3), 4);
    }
}
