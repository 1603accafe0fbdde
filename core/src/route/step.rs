//! The typed route step: one [`Construction`] variant per method, carrying its parameters.
//!
//! A route tree is made of [`Step`]s. Each names its construction with typed parameters (a
//! prime power `q: u64`, a part of a Golay pair as an enum, a seed leaf's sequences as ±1
//! vectors), so a node cannot be built from a misspelt or missing parameter: a recipe that has
//! one is refused when it is read, with an error naming the step and the field.
//!
//! **The recipe format** (`hadamard-recipe/1`, [`super::RECIPE_FORMAT`]) is unchanged from
//! when the parameters were a string map: a step is written
//! `{"method", "order", "params", "reference", "children", "buildable"}` in that order, with
//! `params` a JSON object whose keys are in alphabetical order. [`Construction`]'s serde
//! attributes give `method` (the variant's snake_case name) and `params` (the variant's fields,
//! declared in alphabetical order); [`Step`]'s own `Serialize`/`Deserialize` put the other
//! fields between them. `tests/route_recipes.rs` holds the recipes and route trees an earlier
//! version wrote and checks that each reads and writes back byte for byte.

use super::Method;
use crate::construct::sequences::{
    from_text, to_text, BaseSequences, GolayPair, GsQuadruple, TSequences, TurynType, Williamson,
};
use crate::field::MAX_Q;
use serde::de::{Error as _, MapAccess, Visitor};
use serde::ser::Error as _;
use serde::{Deserialize, Deserializer, Serialize, Serializer};
use serde_json::{Map, Value};
use std::fmt;

/// One node of a route tree.
///
/// For a node that yields a matrix, `order` is its order. For a node that yields sequence data
/// (seed and published leaves, the Golay, base and Turyn steps, Turyn's Williamson family)
/// `order` is the index of the family: the T-length t, the Williamson order m, the
/// Goethals–Seidel length v, the Golay length g, the Turyn parameter n, or the longer length
/// n+p of base sequences.
#[derive(Clone, Debug, PartialEq)]
pub struct Step {
    /// What this node does, with its parameters.
    pub construction: Construction,
    pub order: u64,
    /// The published reference for this step.
    pub reference: String,
    pub children: Vec<Step>,
    /// True when this node and everything below it can be built by this program now.
    pub buildable: bool,
}

impl Step {
    /// A node; `buildable` follows from the construction and the children.
    pub fn new(
        construction: Construction,
        order: u64,
        reference: &str,
        children: Vec<Step>,
    ) -> Step {
        let buildable = construction.implemented() && children.iter().all(|c| c.buildable);
        Step {
            construction,
            order,
            reference: reference.to_string(),
            children,
            buildable,
        }
    }

    /// The construction's name.
    pub fn method(&self) -> Method {
        self.construction.method()
    }

    /// The parameters as the recipe writes them (`params`), keys in alphabetical order.
    pub fn params(&self) -> Map<String, Value> {
        self.construction.params()
    }
}

/// A family of sequence data a leaf can hold (`kind` in the recipe).
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash, Serialize, Deserialize)]
#[serde(rename_all = "snake_case")]
pub enum Family {
    /// Williamson matrices of odd order m.
    Williamson,
    /// A Goethals–Seidel quadruple of length v.
    Gs,
    /// T-sequences of length t.
    Tseq,
    /// Base sequences BS(n+p, n).
    Base,
    /// Turyn-type sequences TT(n).
    Turyn,
    /// A Golay pair of length g.
    Golay,
}

impl Family {
    /// The family in words.
    pub fn words(self) -> &'static str {
        match self {
            Family::Williamson => "Williamson matrices",
            Family::Gs => "a Goethals–Seidel quadruple",
            Family::Tseq => "T-sequences",
            Family::Base => "base sequences",
            Family::Turyn => "Turyn-type sequences",
            Family::Golay => "a Golay pair",
        }
    }

    /// What a node's `order` counts for this family, in words.
    pub fn index_name(self) -> &'static str {
        match self {
            Family::Williamson => "order",
            Family::Turyn => "parameter n =",
            _ => "length",
        }
    }
}

/// The sequences of a seed leaf.
#[derive(Clone, Debug, PartialEq)]
pub enum SeedData {
    Williamson(Williamson),
    Gs(GsQuadruple),
    Tseq(TSequences),
    Base(BaseSequences),
    Turyn(TurynType),
    Golay(GolayPair),
}

impl SeedData {
    /// The family the data belongs to.
    pub fn family(&self) -> Family {
        match self {
            SeedData::Williamson(_) => Family::Williamson,
            SeedData::Gs(_) => Family::Gs,
            SeedData::Tseq(_) => Family::Tseq,
            SeedData::Base(_) => Family::Base,
            SeedData::Turyn(_) => Family::Turyn,
            SeedData::Golay(_) => Family::Golay,
        }
    }
}

/// A leaf holding sequence data from the seed catalogue; the recipe carries the sequences so
/// it replays without the catalogue.
#[derive(Clone, Debug, PartialEq)]
pub struct SeedLeaf {
    /// Where in the seed catalogue the entry is (file and line).
    pub source: String,
    /// Who or what produced the data, how, and when.
    pub provenance: String,
    pub data: SeedData,
}

/// Which T-sequences a Golay pair of length g gives (`part` in the recipe).
#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize, Deserialize)]
pub enum GolayPart {
    /// Length g.
    #[serde(rename = "g")]
    G,
    /// Length g + 1.
    #[serde(rename = "g+1")]
    GPlusOne,
    /// Length 2g + 1.
    #[serde(rename = "2g+1")]
    TwiceGPlusOne,
}

/// Which of Yamada's theorems (`case` in the recipe); only the second is listed as its own
/// method (the first is a case of Miyamoto's).
#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize, Deserialize)]
pub enum YamadaCase {
    /// q ≡ 5 mod 8 and a skew order (q+3)/2 give 4(q+2).
    #[serde(rename = "ii")]
    Second,
}

/// A construction with its parameters: one variant per method.
///
/// The fields of each variant are its recipe `params`, declared in alphabetical order (the
/// order the recipe format writes them); [`Construction::method`] names the variant. The
/// references are in `route::plan::refs`.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
#[serde(
    tag = "method",
    content = "params",
    rename_all = "snake_case",
    deny_unknown_fields
)]
pub enum Construction {
    /// H₂^{⊗k}: order 2^k (Sylvester 1867).
    Sylvester { k: u32 },
    /// Paley's first construction: q+1, q ≡ 3 mod 4 (Paley 1933).
    PaleyOne { q: u64 },
    /// Paley's second construction: 2(q+1), q ≡ 1 mod 4 (Paley 1933).
    PaleyTwo { q: u64 },
    /// H_a ⊗ H_b, the two children.
    Kronecker {},
    /// C⊗H + I⊗(K·H) with C Paley's symmetric conference matrix of order q+1, q ≡ 1 mod 4,
    /// and H the child.
    ConferenceProduct { q: u64 },
    /// The twin prime power difference set over GF(q) × GF(q+2): (q+1)² (Stanton and Sprott
    /// 1958).
    TwinPrimePower { q: u64 },
    /// Williamson's array on the child's Williamson matrices of order m: 4m (Williamson 1944).
    Williamson { m: u64 },
    /// The Goethals–Seidel array on the child's quadruple of length v: 4v (Goethals and
    /// Seidel 1970).
    GoethalsSeidel { v: u64 },
    /// The child's T-sequences of length t in the Goethals–Seidel array: 4t (Turyn 1974).
    TSequences { t: u64 },
    /// T-sequences of length t (first child) with Williamson matrices of order w (second):
    /// 4tw (Cooper and Wallis 1972).
    CooperWallis { t: u64, w: u64 },
    /// The child, a skew matrix of order h, doubled to a skew matrix of order 2h.
    SkewDoubling {},
    /// Miyamoto's theorem: q ≡ 1 mod 4 a prime power and the child of order q−1 give 4q
    /// (1991), by this program's own array (`construct::miyamoto`). Yamada's first theorem is
    /// its case K = H₂ ⊗ H_{(q−1)/2}.
    Miyamoto { q: u64 },
    /// Yamada's second theorem (1989): q ≡ 5 mod 8 and the child, a skew order (q+3)/2, give
    /// 4(q+2). Listed, not built.
    Yamada { case: YamadaCase, q: u64 },
    /// The whole order is known from the literature file; no construction of ours reaches it.
    Literature { note: String },
    /// A leaf: sequence data from the embedded seed catalogue.
    Seed(SeedLeaf),
    /// A leaf: sequence data a paper proves exist, not in our seed catalogue.
    Published { kind: Family },
    /// A Golay pair of length g₁g₂ from the children's pairs of lengths g₁ and g₂ (Turyn 1974).
    GolayProduct {},
    /// A Golay pair of length 2g from the child's of length g (Golay 1961).
    GolayDoubling {},
    /// T-sequences of length g, g+1 or 2g+1 from the child's Golay pair of length g.
    GolayToT { g: u64, part: GolayPart },
    /// Base sequences BS(g₁, g₂) from the children's Golay pairs of lengths g₁ ≥ g₂ (so
    /// T-length g₁ + g₂).
    GolayPairsToBase { g1: u64, g2: u64 },
    /// T-sequences of length 2n+p from the child's base sequences BS(n+p, n).
    BaseToT {},
    /// Base sequences BS(2n−1, n) from the child's Turyn-type sequences TT(n).
    TurynToBase { n: u64 },
    /// Turyn's Williamson matrices of order (q+1)/2, q ≡ 1 mod 4 (Turyn 1972).
    TurynWilliamson { q: u64 },
}

impl Construction {
    /// The method's name.
    pub fn method(&self) -> Method {
        match self {
            Construction::Sylvester { .. } => Method::Sylvester,
            Construction::PaleyOne { .. } => Method::PaleyOne,
            Construction::PaleyTwo { .. } => Method::PaleyTwo,
            Construction::Kronecker {} => Method::Kronecker,
            Construction::ConferenceProduct { .. } => Method::ConferenceProduct,
            Construction::TwinPrimePower { .. } => Method::TwinPrimePower,
            Construction::Williamson { .. } => Method::Williamson,
            Construction::GoethalsSeidel { .. } => Method::GoethalsSeidel,
            Construction::TSequences { .. } => Method::TSequences,
            Construction::CooperWallis { .. } => Method::CooperWallis,
            Construction::SkewDoubling {} => Method::SkewDoubling,
            Construction::Miyamoto { .. } => Method::Miyamoto,
            Construction::Yamada { .. } => Method::Yamada,
            Construction::Literature { .. } => Method::Literature,
            Construction::Seed(_) => Method::Seed,
            Construction::Published { .. } => Method::Published,
            Construction::GolayProduct {} => Method::GolayProduct,
            Construction::GolayDoubling {} => Method::GolayDoubling,
            Construction::GolayToT { .. } => Method::GolayToT,
            Construction::GolayPairsToBase { .. } => Method::GolayPairsToBase,
            Construction::BaseToT {} => Method::BaseToT,
            Construction::TurynToBase { .. } => Method::TurynToBase,
            Construction::TurynWilliamson { .. } => Method::TurynWilliamson,
        }
    }

    /// True when this program can carry out this node with these parameters; the single
    /// place that says which constructions are implemented (the field sizes are
    /// [`crate::field`]'s limit).
    pub fn implemented(&self) -> bool {
        use Construction::*;
        match self {
            Sylvester { .. }
            | Kronecker {}
            | Williamson { .. }
            | GoethalsSeidel { .. }
            | TSequences { .. }
            | CooperWallis { .. }
            | SkewDoubling {}
            | Seed(_)
            | GolayToT { .. }
            | GolayPairsToBase { .. }
            | BaseToT {}
            | TurynToBase { .. }
            | GolayProduct {}
            | GolayDoubling {} => true,
            PaleyOne { q } | PaleyTwo { q } | ConferenceProduct { q } | Miyamoto { q } => {
                *q <= MAX_Q
            }
            TwinPrimePower { q } => q.checked_add(2).is_some_and(|q2| q2 <= MAX_Q),
            // Turyn's family works in GF(q²).
            TurynWilliamson { q } => q.checked_mul(*q).is_some_and(|qq| qq <= MAX_Q),
            Yamada { .. } | Literature { .. } | Published { .. } => false,
        }
    }

    /// True when the node yields a Hadamard matrix (as opposed to sequence data).
    pub fn yields_matrix(&self) -> bool {
        self.method().yields_matrix()
    }

    /// The parameters as the recipe writes them (`params`), keys in alphabetical order.
    pub fn params(&self) -> Map<String, Value> {
        match serde_json::to_value(self) {
            Ok(Value::Object(mut m)) => match m.remove("params") {
                Some(Value::Object(p)) => sorted(p),
                _ => Map::new(),
            },
            _ => Map::new(),
        }
    }
}

/// The map with its keys in alphabetical order, whether or not serde_json keeps insertion
/// order (its `preserve_order` feature).
fn sorted(m: Map<String, Value>) -> Map<String, Value> {
    let mut entries: Vec<(String, Value)> = m.into_iter().collect();
    entries.sort_by(|a, b| a.0.cmp(&b.0));
    entries.into_iter().collect()
}

/// The fields of a seed leaf as the recipe writes them (alphabetical, as the format has them).
#[derive(Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
struct SeedWire {
    #[serde(default, skip_serializing_if = "Option::is_none")]
    a: Option<String>,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    b: Option<String>,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    c: Option<String>,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    d: Option<String>,
    kind: Family,
    provenance: String,
    source: String,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    t1: Option<String>,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    t2: Option<String>,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    t3: Option<String>,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    t4: Option<String>,
}

/// A seed leaf's sequence, read from its `+`/`-`/`0` text; an error names the field.
fn sequence(text: Option<String>, name: &str, kind: Family) -> Result<Vec<i8>, String> {
    let text = text.ok_or_else(|| format!("{} need the sequence `{name}`", kind.words()))?;
    from_text(&text).map_err(|i| {
        format!(
            "`{name}`: bad character at position {} (a sequence is written with +, - and 0)",
            i + 1
        )
    })
}

impl SeedWire {
    fn into_leaf(self) -> Result<SeedLeaf, String> {
        let SeedWire {
            a,
            b,
            c,
            d,
            kind,
            provenance,
            source,
            t1,
            t2,
            t3,
            t4,
        } = self;
        // The sequences of another family must be absent.
        let own: &[&str] = match kind {
            Family::Tseq => &["t1", "t2", "t3", "t4"],
            Family::Golay => &["a", "b"],
            _ => &["a", "b", "c", "d"],
        };
        let all = [
            ("a", &a),
            ("b", &b),
            ("c", &c),
            ("d", &d),
            ("t1", &t1),
            ("t2", &t2),
            ("t3", &t3),
            ("t4", &t4),
        ];
        if let Some((name, _)) = all
            .iter()
            .find(|(name, v)| v.is_some() && !own.contains(name))
        {
            return Err(format!("`{name}` is not a sequence of {}", kind.words()));
        }
        let data = match kind {
            Family::Williamson => SeedData::Williamson(Williamson {
                a: sequence(a, "a", kind)?,
                b: sequence(b, "b", kind)?,
                c: sequence(c, "c", kind)?,
                d: sequence(d, "d", kind)?,
            }),
            Family::Gs => SeedData::Gs(GsQuadruple {
                a: [
                    sequence(a, "a", kind)?,
                    sequence(b, "b", kind)?,
                    sequence(c, "c", kind)?,
                    sequence(d, "d", kind)?,
                ],
            }),
            Family::Tseq => SeedData::Tseq(TSequences {
                t: [
                    sequence(t1, "t1", kind)?,
                    sequence(t2, "t2", kind)?,
                    sequence(t3, "t3", kind)?,
                    sequence(t4, "t4", kind)?,
                ],
            }),
            Family::Base => SeedData::Base(BaseSequences {
                a: sequence(a, "a", kind)?,
                b: sequence(b, "b", kind)?,
                c: sequence(c, "c", kind)?,
                d: sequence(d, "d", kind)?,
            }),
            Family::Turyn => SeedData::Turyn(TurynType {
                a: sequence(a, "a", kind)?,
                b: sequence(b, "b", kind)?,
                c: sequence(c, "c", kind)?,
                d: sequence(d, "d", kind)?,
            }),
            Family::Golay => SeedData::Golay(GolayPair {
                a: sequence(a, "a", kind)?,
                b: sequence(b, "b", kind)?,
            }),
        };
        Ok(SeedLeaf {
            source,
            provenance,
            data,
        })
    }

    fn from_leaf(leaf: &SeedLeaf) -> SeedWire {
        let mut w = SeedWire {
            a: None,
            b: None,
            c: None,
            d: None,
            kind: leaf.data.family(),
            provenance: leaf.provenance.clone(),
            source: leaf.source.clone(),
            t1: None,
            t2: None,
            t3: None,
            t4: None,
        };
        let text = |s: &[i8]| Some(to_text(s));
        match &leaf.data {
            SeedData::Williamson(Williamson { a, b, c, d })
            | SeedData::Base(BaseSequences { a, b, c, d })
            | SeedData::Turyn(TurynType { a, b, c, d })
            | SeedData::Gs(GsQuadruple { a: [a, b, c, d] }) => {
                (w.a, w.b, w.c, w.d) = (text(a), text(b), text(c), text(d));
            }
            SeedData::Tseq(TSequences { t: [a, b, c, d] }) => {
                (w.t1, w.t2, w.t3, w.t4) = (text(a), text(b), text(c), text(d));
            }
            SeedData::Golay(GolayPair { a, b }) => (w.a, w.b) = (text(a), text(b)),
        }
        w
    }
}

impl Serialize for SeedLeaf {
    fn serialize<S: Serializer>(&self, s: S) -> Result<S::Ok, S::Error> {
        SeedWire::from_leaf(self).serialize(s)
    }
}

impl<'de> Deserialize<'de> for SeedLeaf {
    fn deserialize<D: Deserializer<'de>>(d: D) -> Result<Self, D::Error> {
        SeedWire::deserialize(d)?
            .into_leaf()
            .map_err(D::Error::custom)
    }
}

/// A step as the recipe writes it.
#[derive(Serialize)]
struct StepWire<C> {
    method: Method,
    order: u64,
    params: Value,
    reference: String,
    children: Vec<C>,
    buildable: bool,
}

impl Serialize for Step {
    fn serialize<S: Serializer>(&self, s: S) -> Result<S::Ok, S::Error> {
        let Value::Object(mut tagged) =
            serde_json::to_value(&self.construction).map_err(S::Error::custom)?
        else {
            return Err(S::Error::custom("a construction serialises to an object"));
        };
        // The serde tag and `Construction::method` are two spellings of one name.
        if tagged.get("method") != Some(&Value::String(method_name(self.method()))) {
            return Err(S::Error::custom(format!(
                "Construction::method gives {:?} for a `{}` step",
                self.method(),
                tagged.get("method").and_then(Value::as_str).unwrap_or("")
            )));
        }
        let params = match tagged.remove("params") {
            Some(Value::Object(m)) => Value::Object(sorted(m)),
            _ => Value::Object(Map::new()),
        };
        StepWire {
            method: self.method(),
            order: self.order,
            params,
            reference: self.reference.clone(),
            children: self.children.iter().collect(),
            buildable: self.buildable,
        }
        .serialize(s)
    }
}

impl<'de> Deserialize<'de> for Step {
    fn deserialize<D: Deserializer<'de>>(d: D) -> Result<Self, D::Error> {
        d.deserialize_struct("Step", STEP_FIELDS, StepVisitor)
    }
}

const STEP_FIELDS: &[&str] = &[
    "method",
    "order",
    "params",
    "reference",
    "children",
    "buildable",
];

/// Reads a step field by field, so that a bad `params` is refused as soon as it is read: the
/// error then carries the position of that step's parameters, not of the end of the recipe.
struct StepVisitor;

/// Fills a field once; a repeated field is an error naming it.
fn once<T, E: serde::de::Error>(slot: &mut Option<T>, v: T, name: &'static str) -> Result<(), E> {
    if slot.is_some() {
        return Err(E::duplicate_field(name));
    }
    *slot = Some(v);
    Ok(())
}

/// A step's construction from its method and params, with an error naming the step.
fn read_construction(
    method: Method,
    order: Option<u64>,
    params: Value,
) -> Result<Construction, String> {
    let tagged = serde_json::json!({ "method": method, "params": params });
    Construction::deserialize(tagged).map_err(|e| {
        let order = order.map(|n| format!(" of order {n}")).unwrap_or_default();
        format!("the `{}` step{order}: params: {e}", method_name(method))
    })
}

impl<'de> Visitor<'de> for StepVisitor {
    type Value = Step;

    fn expecting(&self, f: &mut fmt::Formatter) -> fmt::Result {
        f.write_str("a route step {method, order, params, reference, children, buildable}")
    }

    fn visit_map<A: MapAccess<'de>>(self, mut map: A) -> Result<Step, A::Error> {
        let mut method: Option<Method> = None;
        let mut order = None;
        let mut params: Option<Value> = None;
        let mut construction = None;
        let mut reference = None;
        let mut children = None;
        let mut buildable = None;
        while let Some(key) = map.next_key::<String>()? {
            match key.as_str() {
                "method" => once(&mut method, map.next_value()?, "method")?,
                "order" => once(&mut order, map.next_value()?, "order")?,
                "params" => {
                    let v: Value = map.next_value()?;
                    // The recipe format writes `method` first; read the construction now.
                    if let Some(m) = method {
                        construction =
                            Some(read_construction(m, order, v.clone()).map_err(A::Error::custom)?);
                    }
                    once(&mut params, v, "params")?;
                }
                "reference" => once(&mut reference, map.next_value()?, "reference")?,
                "children" => once(&mut children, map.next_value()?, "children")?,
                "buildable" => once(&mut buildable, map.next_value()?, "buildable")?,
                other => return Err(A::Error::unknown_field(other, STEP_FIELDS)),
            }
        }
        let method = method.ok_or_else(|| A::Error::missing_field("method"))?;
        let params = params.ok_or_else(|| A::Error::missing_field("params"))?;
        let construction = match construction {
            Some(c) => c,
            None => read_construction(method, order, params).map_err(A::Error::custom)?,
        };
        Ok(Step {
            construction,
            order: order.ok_or_else(|| A::Error::missing_field("order"))?,
            reference: reference.ok_or_else(|| A::Error::missing_field("reference"))?,
            children: children.ok_or_else(|| A::Error::missing_field("children"))?,
            buildable: buildable.ok_or_else(|| A::Error::missing_field("buildable"))?,
        })
    }
}

/// The method's name as the recipe writes it (`paley_one`).
pub fn method_name(m: Method) -> String {
    serde_json::to_value(m)
        .ok()
        .and_then(|v| v.as_str().map(str::to_owned))
        .unwrap_or_default()
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Reads a step as a recipe's tree, so errors carry the recipe's line and column.
    fn read(json: &str) -> Result<Step, String> {
        let recipe =
            format!("{{\"format\":\"hadamard-recipe/1\",\"order\":0,\"id\":null,\"tree\":{json}}}");
        serde_json::from_str::<super::super::Recipe>(&recipe)
            .map(|r| r.tree)
            .map_err(|e| e.to_string())
    }

    #[test]
    fn route_step_errors_name_the_step_and_the_field() {
        let ok = r#"{"method":"paley_one","order":12,"params":{"q":11},"reference":"r","children":[],"buildable":true}"#;
        let s = read(ok).unwrap();
        assert_eq!(s.construction, Construction::PaleyOne { q: 11 });
        assert_eq!(serde_json::to_string(&s).unwrap(), ok);
        // A misspelt parameter: once silently read as something else, now refused by name.
        let e = read(&ok.replace(r#""q":11"#, r#""p":11"#)).unwrap_err();
        assert!(e.contains("paley_one") && e.contains("`p`"), "{e}");
        let e = read(&ok.replace(r#""q":11"#, r#""q":11,"k":2"#)).unwrap_err();
        assert!(e.contains("`k`"), "{e}");
        let e = read(&ok.replace(r#""q":11"#, "")).unwrap_err();
        assert!(e.contains("`q`") && e.contains("line 1 column"), "{e}");
        // The position is that of the step's params, not of the end of the recipe.
        let nested = format!(
            r#"{{"method":"kronecker","order":24,"params":{{}},"reference":"r","children":[
{},
{}],"buildable":true}}"#,
            ok.replace(r#""order":12"#, r#""order":2"#),
            ok.replace(r#""q":11"#, r#""p":11"#)
        );
        let e = read(&nested).unwrap_err();
        assert!(e.contains("`p`") && e.contains("line 3 column"), "{e}");
        let e = read(&ok.replace("paley_one", "paley_three")).unwrap_err();
        assert!(e.contains("paley_three"), "{e}");
        let e = read(&ok.replace(r#""buildable""#, r#""bildable""#)).unwrap_err();
        assert!(e.contains("bildable"), "{e}");
    }

    #[test]
    fn route_seed_leaf_errors_name_the_sequence() {
        // A Golay pair of length 2 (++, +-): N_a(1) + N_b(1) = 1 − 1 = 0 [common practice].
        let ok = r#"{"method":"seed","order":2,"params":{"a":"++","b":"+-","kind":"golay","provenance":"p","source":"s"},"reference":"r","children":[],"buildable":true}"#;
        let s = read(ok).unwrap();
        assert_eq!(serde_json::to_string(&s).unwrap(), ok);
        let e = read(&ok.replace(r#""kind":"golay""#, r#""kind":"golden""#)).unwrap_err();
        assert!(e.contains("golden"), "{e}");
        let e = read(&ok.replace(r#""a":"++","#, "")).unwrap_err();
        assert!(e.contains("`a`"), "{e}");
        let e = read(&ok.replace(r#""b":"+-","#, r#""b":"+-","c":"++","#)).unwrap_err();
        assert!(e.contains("`c`") && e.contains("Golay"), "{e}");
        let e = read(&ok.replace(r#""b":"+-""#, r#""b":"+x""#)).unwrap_err();
        assert!(e.contains("`b`") && e.contains("position 2"), "{e}");
        // The retired stringly lookup sent any unknown name to `t4`.
        let e = read(&ok.replace(r#""b":"+-""#, r#""b":"+-","t5":"+""#)).unwrap_err();
        assert!(e.contains("t5"), "{e}");
    }
}
