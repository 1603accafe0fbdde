//! Two-level screening designs: the orthogonal main-effect design of a normalised matrix.
//!
//! Normalise H (first row and column all +1). Every other column then has n/2 entries of each
//! sign and any two columns are orthogonal, so the rows of the normalised matrix, read in any
//! k ≤ n−1 of the columns 1..n−1, are n runs of a two-level design for k factors in which every
//! main effect is estimated independently of the others with the same variance (Plackett and
//! Burman, "The design of optimum multifactorial experiments", Biometrika 33, 1946 [recalled]).
//!
//! Options, each recorded in the design:
//! - **columns**: by default columns 1..k, so adding a factor never changes the earlier ones;
//!   any k distinct columns from 1..n−1 give the same properties;
//! - **fold-over**: append the n runs with every sign reversed. Main effects are then free of
//!   aliasing with two-factor interactions (Box and Hunter, Technometrics 3, 1961 [recalled]);
//! - **centre points**: runs with every factor at its middle level (coded 0), for a check of
//!   curvature; they keep every column balanced and orthogonal;
//! - **levels**: coded −1/+1, or named low and high values (the centre is their midpoint when
//!   both are numbers, else `centre`);
//! - **randomisation**: the run order is a Fisher–Yates shuffle driven by [`SplitMix64`] from a
//!   recorded seed, so anyone can replay it (see [`super::rng`]).
//!
//! The design states its properties, computed on the runs it lists: every pair of factor
//! columns orthogonal and every column balanced.

use super::rng::SplitMix64;
use super::{orthogonal_and_balanced, write_csv, DeriveError};
use crate::verify::Verified;
use serde::Serialize;

/// What to build.
#[derive(Clone, Debug, Default, PartialEq, Eq)]
pub struct ScreeningConfig {
    /// The number of factors k (1..n−1). Ignored when `columns` is given.
    pub factors: Option<usize>,
    /// The columns of the normalised matrix to use (each in 1..n−1, distinct).
    pub columns: Option<Vec<usize>>,
    /// The factor names (k of them); default `A`, `B`, … (then `X27`, …).
    pub names: Option<Vec<String>>,
    /// Named (low, high) levels: one pair for every factor, or k pairs.
    pub levels: Option<Vec<(String, String)>>,
    /// Append the fold-over.
    pub fold_over: bool,
    /// The number of centre-point runs.
    pub centre_points: usize,
    /// Randomise the run order from this seed; `None` keeps the standard order.
    pub seed: Option<u64>,
}

/// One factor: its name, the column it is read from, and its levels.
#[derive(Clone, Debug, PartialEq, Eq, Serialize)]
pub struct Factor {
    pub name: String,
    /// The column of the normalised matrix, from 0 (column 0 is the constant one, never used).
    pub column: usize,
    /// The level written for −1.
    pub low: String,
    /// The level written for +1.
    pub high: String,
    /// The level written for a centre point.
    pub centre: String,
}

/// Where a run comes from.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum RunKind {
    /// A row of the normalised matrix.
    Design,
    /// A row of the normalised matrix with every sign reversed.
    FoldOver,
    /// Every factor at its middle level.
    Centre,
}

/// One run.
#[derive(Clone, Debug, PartialEq, Eq, Serialize)]
pub struct Run {
    /// Its place in the run order, from 1.
    pub run: usize,
    /// Its place in the standard order, from 1: the design rows, then the fold-over, then the
    /// centre points.
    pub standard_order: usize,
    pub kind: RunKind,
    /// The row of the normalised matrix it comes from (from 0), or `None` for a centre point.
    pub source_row: Option<usize>,
    /// Coded levels: −1, +1, or 0 for a centre point.
    pub coded: Vec<i8>,
}

/// The properties the design has, computed on its runs.
#[derive(Clone, Debug, PartialEq, Eq, Serialize)]
pub struct DesignProperties {
    /// Every pair of factor columns has inner product 0 over the runs.
    pub columns_orthogonal: bool,
    /// Every factor column sums to 0: as many runs at the high level as at the low.
    pub columns_balanced: bool,
}

/// How the run order was made.
#[derive(Clone, Debug, PartialEq, Eq, Serialize)]
pub struct Randomisation {
    /// The seed, or `None` for the standard order.
    pub seed: Option<u64>,
    pub method: String,
}

/// A two-level screening design.
#[derive(Clone, Debug, PartialEq, Eq, Serialize)]
pub struct ScreeningDesign {
    pub kind: &'static str,
    /// The order n of the source matrix.
    pub order: usize,
    /// The id of the source matrix (as given, before normalising).
    pub source_id: String,
    /// The id of the normalised matrix the runs are read from.
    pub normalized_id: String,
    pub factors: Vec<Factor>,
    /// Why these columns.
    pub columns_reason: String,
    pub fold_over: bool,
    pub centre_points: usize,
    pub randomisation: Randomisation,
    pub properties: DesignProperties,
    /// The runs, in run order.
    pub runs: Vec<Run>,
    pub reference: &'static str,
}

const DEFAULT_REASON: &str = "columns 1..k of the normalised matrix: every column but the constant column 0 is balanced and orthogonal to the others, so any k of them give an orthogonal main-effect design, and taking the first k means adding a factor never changes the earlier ones";

fn default_name(i: usize) -> String {
    if i < 26 {
        ((b'A' + i as u8) as char).to_string()
    } else {
        format!("X{}", i + 1)
    }
}

fn midpoint(low: &str, high: &str) -> String {
    match (low.trim().parse::<f64>(), high.trim().parse::<f64>()) {
        (Ok(a), Ok(b)) if a.is_finite() && b.is_finite() => format!("{}", (a + b) / 2.0),
        _ => "centre".to_owned(),
    }
}

/// The largest number of runs a design is built with (fold-over and centre points included).
pub const MAX_RUNS: usize = 1 << 16;

/// Builds the design the configuration describes from `h`.
pub fn screening_design(
    h: &Verified,
    cfg: &ScreeningConfig,
) -> Result<ScreeningDesign, DeriveError> {
    let n = h.order();
    if n < 2 {
        return Err(DeriveError::new(
            "matrix",
            format!("a design needs an order of at least 2; this matrix has order {n}"),
        ));
    }
    let (columns, reason) = match &cfg.columns {
        Some(cols) => {
            if cols.is_empty() {
                return Err(DeriveError::new("columns", "give at least one column"));
            }
            let mut seen = vec![false; n];
            for (k, &c) in cols.iter().enumerate() {
                if c == 0 || c >= n {
                    return Err(DeriveError::new("columns", format!("item {}: column {c} is not one of 1..{} (column 0 of the normalised matrix is constant and carries no factor)", k + 1, n - 1)));
                }
                if seen[c] {
                    return Err(DeriveError::new(
                        "columns",
                        format!("item {}: column {c} is given twice", k + 1),
                    ));
                }
                seen[c] = true;
            }
            (cols.clone(), "the columns were chosen by the user; any distinct columns 1..n−1 of the normalised matrix give an orthogonal main-effect design".to_owned())
        }
        None => {
            let k = cfg.factors.unwrap_or(n - 1);
            if k == 0 || k > n - 1 {
                return Err(DeriveError::new(
                    "factors",
                    format!(
                        "a matrix of order {n} gives 1 to {} factors, not {k}",
                        n - 1
                    ),
                ));
            }
            ((1..=k).collect(), DEFAULT_REASON.to_owned())
        }
    };
    let k = columns.len();
    let names: Vec<String> = match &cfg.names {
        Some(v) if v.len() != k => {
            return Err(DeriveError::new(
                "names",
                format!("{} names for {k} factors", v.len()),
            ))
        }
        Some(v) => {
            if let Some(p) = v.iter().position(|s| s.trim().is_empty()) {
                return Err(DeriveError::new(
                    "names",
                    format!("name {} is empty", p + 1),
                ));
            }
            v.clone()
        }
        None => (0..k).map(default_name).collect(),
    };
    let levels: Vec<(String, String)> = match &cfg.levels {
        None => vec![("-1".into(), "+1".into()); k],
        Some(v) if v.len() == 1 => vec![v[0].clone(); k],
        Some(v) if v.len() == k => v.clone(),
        Some(v) => {
            return Err(DeriveError::new(
                "levels",
                format!(
                    "{} level pairs for {k} factors: give one pair for all, or one per factor",
                    v.len()
                ),
            ))
        }
    };
    let runs_total = (n * if cfg.fold_over { 2 } else { 1 }).saturating_add(cfg.centre_points);
    if runs_total > MAX_RUNS {
        return Err(DeriveError::new(
            "centre-points",
            format!("the design would have more than {MAX_RUNS} runs"),
        ));
    }
    if runs_total.saturating_mul(k) > super::MAX_CELLS {
        return Err(DeriveError::new(
            "factors",
            format!("{runs_total} runs × {k} factors is more than the {} cells a design is made with; choose fewer factors", super::MAX_CELLS),
        ));
    }
    // Each run writes, per factor, a level label (CSV) or a coded value such as `-1,` (JSON),
    // plus its run number, standard order and kind; the header holds the names.
    let per_run: usize = 48
        + levels
            .iter()
            .map(|(l, h)| l.len().max(h.len()).max(3) + 3)
            .sum::<usize>();
    let bytes = runs_total
        .saturating_mul(per_run)
        .saturating_add(names.iter().map(|s| s.len() + 64).sum::<usize>());
    if bytes > super::MAX_OUTPUT_BYTES {
        return Err(DeriveError::new(
            if cfg.centre_points > 0 { "centre-points" } else { "factors" },
            format!(
                "the design would take about {} MiB to write, more than the {} MiB a design may have; choose fewer factors or runs, or shorter level labels",
                bytes >> 20,
                super::MAX_OUTPUT_BYTES >> 20
            ),
        ));
    }
    let factors: Vec<Factor> = names
        .into_iter()
        .zip(&columns)
        .zip(levels)
        .map(|((name, &column), (low, high))| {
            let centre = if cfg.levels.is_none() {
                "0".to_owned()
            } else {
                midpoint(&low, &high)
            };
            Factor {
                name,
                column,
                low,
                high,
                centre,
            }
        })
        .collect();

    let hn = h.matrix().normalized();
    let mut runs: Vec<Run> = Vec::with_capacity(runs_total);
    for i in 0..n {
        let coded = columns.iter().map(|&c| hn.get(i, c)).collect();
        runs.push(Run {
            run: 0,
            standard_order: runs.len() + 1,
            kind: RunKind::Design,
            source_row: Some(i),
            coded,
        });
    }
    if cfg.fold_over {
        for i in 0..n {
            let coded = columns.iter().map(|&c| -hn.get(i, c)).collect();
            runs.push(Run {
                run: 0,
                standard_order: runs.len() + 1,
                kind: RunKind::FoldOver,
                source_row: Some(i),
                coded,
            });
        }
    }
    for _ in 0..cfg.centre_points {
        runs.push(Run {
            run: 0,
            standard_order: runs.len() + 1,
            kind: RunKind::Centre,
            source_row: None,
            coded: vec![0; k],
        });
    }
    if let Some(seed) = cfg.seed {
        SplitMix64::new(seed).shuffle(&mut runs);
    }
    for (p, r) in runs.iter_mut().enumerate() {
        r.run = p + 1;
    }
    let coded: Vec<Vec<i8>> = runs.iter().map(|r| r.coded.clone()).collect();
    let (columns_orthogonal, columns_balanced) = orthogonal_and_balanced(&coded, k);
    let method = match cfg.seed {
        Some(_) => "Fisher–Yates shuffle of the standard order driven by SplitMix64 from the seed (see docs/cli.md)".to_owned(),
        None => "standard order, not randomised (give a seed to randomise)".to_owned(),
    };
    Ok(ScreeningDesign {
        kind: "screening-design",
        order: n,
        source_id: h.id().to_owned(),
        normalized_id: crate::id::matrix_id(&hn),
        factors,
        columns_reason: reason,
        fold_over: cfg.fold_over,
        centre_points: cfg.centre_points,
        randomisation: Randomisation { seed: cfg.seed, method },
        properties: DesignProperties { columns_orthogonal, columns_balanced },
        runs,
        reference: "Plackett and Burman, Biometrika 33 (1946); fold-over: Box and Hunter, Technometrics 3 (1961)",
    })
}

impl ScreeningDesign {
    /// The level written for a coded value of factor `f`.
    pub fn level(&self, f: usize, coded: i8) -> &str {
        let fa = &self.factors[f];
        match coded {
            1 => &fa.high,
            -1 => &fa.low,
            _ => &fa.centre,
        }
    }

    /// CSV: a header `run,standard_order,kind,<factor names>`, then one line per run in run
    /// order, levels as named (or −1/+1, 0 for centre points).
    pub fn write_csv(&self, out: &mut dyn std::io::Write) -> std::io::Result<()> {
        let mut header = vec![
            "run".to_owned(),
            "standard_order".to_owned(),
            "kind".to_owned(),
        ];
        // Names and level labels are the user's text: neutralised against spreadsheet
        // formulas (see `csv_text_cell`); the coded numbers are not touched.
        header.extend(
            self.factors
                .iter()
                .map(|f| super::csv_text_cell(&f.name).into_owned()),
        );
        let body = self.runs.iter().map(|r| {
            let kind = match r.kind {
                RunKind::Design => "design",
                RunKind::FoldOver => "fold-over",
                RunKind::Centre => "centre",
            };
            let mut row = vec![
                r.run.to_string(),
                r.standard_order.to_string(),
                kind.to_owned(),
            ];
            row.extend(
                r.coded
                    .iter()
                    .enumerate()
                    .map(|(f, &c)| super::csv_text_cell(self.level(f, c)).into_owned()),
            );
            row
        });
        write_csv(std::iter::once(header).chain(body), out)
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::construct::{paley_one, sylvester};

    #[test]
    fn plackett_burman_12_has_orthogonal_balanced_columns() {
        let h = paley_one(11).unwrap();
        let d = screening_design(
            &h,
            &ScreeningConfig {
                factors: Some(11),
                ..Default::default()
            },
        )
        .unwrap();
        assert_eq!(d.runs.len(), 12);
        assert!(d.properties.columns_orthogonal && d.properties.columns_balanced);
        let f = screening_design(
            &h,
            &ScreeningConfig {
                factors: Some(5),
                fold_over: true,
                centre_points: 3,
                seed: Some(9),
                ..Default::default()
            },
        )
        .unwrap();
        assert_eq!(f.runs.len(), 27);
        assert!(f.properties.columns_orthogonal && f.properties.columns_balanced);
        let mut order: Vec<usize> = f.runs.iter().map(|r| r.standard_order).collect();
        assert_ne!(order, (1..=27).collect::<Vec<_>>());
        order.sort();
        assert_eq!(order, (1..=27).collect::<Vec<_>>());
    }

    #[test]
    fn bad_requests_name_their_parameter() {
        let h = sylvester(3).unwrap();
        let e = screening_design(
            &h,
            &ScreeningConfig {
                factors: Some(8),
                ..Default::default()
            },
        )
        .unwrap_err();
        assert_eq!(e.parameter, "factors");
        let e = screening_design(
            &h,
            &ScreeningConfig {
                columns: Some(vec![1, 0]),
                ..Default::default()
            },
        )
        .unwrap_err();
        assert!(e.to_string().starts_with("columns: item 2"), "{e}");
        let huge = ScreeningConfig {
            centre_points: usize::MAX,
            ..Default::default()
        };
        assert_eq!(
            screening_design(&h, &huge).unwrap_err().parameter,
            "centre-points"
        );
        let e = screening_design(
            &h,
            &ScreeningConfig {
                factors: Some(3),
                levels: Some(vec![("a".into(), "b".into()); 2]),
                ..Default::default()
            },
        )
        .unwrap_err();
        assert_eq!(e.parameter, "levels");
    }

    #[test]
    fn named_levels_and_numeric_centres() {
        let h = sylvester(2).unwrap();
        let cfg = ScreeningConfig {
            factors: Some(2),
            centre_points: 1,
            levels: Some(vec![
                ("150".into(), "200".into()),
                ("low".into(), "high".into()),
            ]),
            ..Default::default()
        };
        let d = screening_design(&h, &cfg).unwrap();
        let mut out = Vec::new();
        d.write_csv(&mut out).unwrap();
        let text = String::from_utf8(out).unwrap();
        assert!(
            text.starts_with("run,standard_order,kind,A,B\n1,1,design,200,high\n"),
            "{text}"
        );
        assert!(text.ends_with("5,5,centre,175,centre\n"), "{text}");
    }
}
