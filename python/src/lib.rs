//! `hadamard_registry._native`: the Rust half of the Python package.
//!
//! Every function here is a thin shell over `hadamard-core`: the matrices come from
//! `route::build_order` (the route `hadamard build N` takes), every verdict from core's exact
//! check, and the JSON objects from the same serialisation the CLI's `--json` prints
//! (`hadamard_core::json`, or the core types themselves). The Python half
//! (`hadamard_registry/__init__.py`) turns the JSON into dicts, checks and lays out numpy
//! inputs, and raises the exceptions of `hadamard_registry.errors`.
//!
//! The one piece of arithmetic of its own is the rotation kernel ([`rotate_one`]): the fast
//! Walsh–Hadamard transform on the 2^a part and a dense ±1 product on the order-m part of
//! H = H_m ⊗ H_{2^a}.

use hadamard_core::construct::{kronecker, sylvester};
use hadamard_core::derive::brr::replication;
use hadamard_core::derive::screening::{screening_design, ScreeningConfig};
use hadamard_core::derive::DeriveError;
use hadamard_core::diagnose::diagnose;
use hadamard_core::formats::{self, ReadOptions};
use hadamard_core::json;
use hadamard_core::matrix::Matrix;
use hadamard_core::repair::CompletionLimits;
use hadamard_core::route::{self, BuildError, Status};
use hadamard_core::verify::{self, certify, Verified};
use numpy::ndarray::Array2;
use numpy::{IntoPyArray, PyArray2, PyReadonlyArray2, PyUntypedArrayMethods};
use pyo3::prelude::*;
use rayon::prelude::*;
use std::collections::HashMap;
use std::ops::{Add, AddAssign, Mul, Neg, Sub, SubAssign};
use std::sync::{Arc, Mutex, OnceLock};
use std::time::Instant;

/// The largest number of rows, and of columns, accepted: the same limit as the file readers.
const MAX_ORDER: usize = 1 << 15;

/// An instance of the exception class `name` of `hadamard_registry.errors`, called with `args`.
fn error<'py, A>(py: Python<'py>, name: &str, args: A) -> PyErr
where
    A: pyo3::call::PyCallArgs<'py>,
{
    match py
        .import("hadamard_registry.errors")
        .and_then(|m| m.getattr(name))
        .and_then(|c| c.call1(args))
    {
        Ok(e) => PyErr::from_value(e),
        Err(e) => e,
    }
}

fn status_name(s: Status) -> String {
    serde_json::to_value(s)
        .ok()
        .and_then(|v| v.as_str().map(str::to_owned))
        .unwrap_or_default()
}

fn to_json<T: serde::Serialize>(v: &T) -> String {
    serde_json::to_string(v).unwrap_or_else(|_| "null".into())
}

/// The matrix as a C-ordered n×m int8 array of ±1.
fn to_array<'py>(py: Python<'py>, m: &Matrix) -> Bound<'py, PyArray2<i8>> {
    let (r, c) = (m.rows(), m.cols());
    let mut v = Vec::with_capacity(r * c);
    for i in 0..r {
        let words = m.row_words(i);
        v.extend((0..c).map(|j| 1 - 2 * ((words[j / 64] >> (j % 64)) & 1) as i8));
    }
    Array2::from_shape_vec((r, c), v)
        .expect("r·c entries")
        .into_pyarray(py)
}

/// A ±1 int8 array (C-contiguous, checked by the Python half) as a bit-packed matrix.
fn from_array(a: &PyReadonlyArray2<'_, i8>) -> PyResult<Matrix> {
    let (r, c) = (a.shape()[0], a.shape()[1]);
    let s = a.as_slice()?;
    Ok(Matrix::from_fn(r, c, |i, j| s[i * c + j] < 0))
}

/// Why order `n` gave no matrix, as `NotConstructibleError(order, status, reason)`.
fn build_error(py: Python<'_>, n: u64, e: BuildError) -> PyErr {
    match e {
        BuildError::NoRoute { status, note, .. } => {
            let info = route::order_info(n);
            let mut reason = note;
            if let Some(l) = info.literature {
                reason += &format!(" Literature: {l}");
            }
            error(
                py,
                "NotConstructibleError",
                (n, status_name(status), reason),
            )
        }
        BuildError::TooLarge { .. } => {
            let status = route::order_info(n).status;
            error(
                py,
                "NotConstructibleError",
                (n, status_name(status), e.to_string()),
            )
        }
        other => error(py, "HadamardError", (other.to_string(),)),
    }
}

fn build_verified(py: Python<'_>, n: u64) -> PyResult<Verified> {
    py.detach(|| route::build_order(n))
        .map_err(|e| build_error(py, n, e))
}

/// `build(n) -> (array, id)`: the catalogue's matrix of order n, by the best buildable route.
#[pyfunction]
fn build<'py>(py: Python<'py>, n: u64) -> PyResult<(Bound<'py, PyArray2<i8>>, String)> {
    let v = build_verified(py, n)?;
    Ok((to_array(py, v.matrix()), v.id().to_owned()))
}

/// `verify_array(a, erasures, max_pairs) -> str`: the `hadamard verify --json` object.
#[pyfunction]
fn verify_array(
    py: Python<'_>,
    a: PyReadonlyArray2<'_, i8>,
    erasures: Vec<(usize, usize)>,
    max_pairs: usize,
) -> PyResult<String> {
    let m = from_array(&a)?;
    Ok(py.detach(|| check(&m, &erasures, "numpy", max_pairs)))
}

/// `verify_path(path, max_pairs) -> str`: reads the file in any of the five formats.
#[pyfunction]
fn verify_path(py: Python<'_>, path: std::path::PathBuf, max_pairs: usize) -> PyResult<String> {
    let shown = path.display().to_string();
    let bytes = std::fs::read(&path).map_err(|e| {
        error(
            py,
            "MatrixParseError",
            (shown.clone(), format!("cannot read it: {e}"), "null"),
        )
    })?;
    let parsed = py
        .detach(|| formats::read(&bytes, &ReadOptions::default()))
        .map_err(|e| {
            error(
                py,
                "MatrixParseError",
                (shown.clone(), e.to_string(), to_json(&e.location)),
            )
        })?;
    Ok(py.detach(|| {
        check(
            &parsed.matrix,
            &parsed.erasures,
            parsed.format.name(),
            max_pairs,
        )
    }))
}

fn check(m: &Matrix, erasures: &[(usize, usize)], format: &str, cap: usize) -> String {
    let start = Instant::now();
    let report = verify::verify_with_cap(m, cap);
    let elapsed = start.elapsed().as_secs_f64() * 1e3;
    let follow = diagnose(m, erasures, &report, CompletionLimits::default());
    to_json(&json::verification(&report, &follow, format, elapsed))
}

/// `routes_json(n) -> str`: what `hadamard routes N --json` prints.
#[pyfunction]
fn routes_json(py: Python<'_>, n: u64) -> String {
    py.detach(|| to_json(&route::order_info(n)))
}

/// `advice_json(d) -> str`: what `hadamard advise --dimension D --json` prints.
#[pyfunction]
fn advice_json(py: Python<'_>, d: u64) -> String {
    py.detach(|| to_json(&route::dimension_advice(d)))
}

/// `at_least_json(k) -> str`: what `hadamard advise --at-least K --json` prints.
#[pyfunction]
fn at_least_json(py: Python<'_>, k: u64) -> String {
    py.detach(|| to_json(&json::smallest_at_least(k).2))
}

// ---------------------------------------------------------------------------------------------
// The rotation.

/// How a dimension d = 2^a·m is rotated: H = H_m ⊗ H_{2^a}, with H_m the catalogue's matrix of
/// the smallest constructible order m that leaves a power of two, and H_{2^a} Sylvester's
/// matrix in natural order (entry (i, j) = (−1)^popcount(i AND j)).
struct Plan {
    a: u32,
    m: usize,
    dense: Verified,
    /// H_m row-major as ±1 numbers, for the dense product when a = 0.
    signs: Vec<i8>,
}

fn plans() -> &'static Mutex<HashMap<u64, Arc<Plan>>> {
    static P: OnceLock<Mutex<HashMap<u64, Arc<Plan>>>> = OnceLock::new();
    P.get_or_init(Default::default)
}

fn rotation_ids() -> &'static Mutex<HashMap<u64, String>> {
    static P: OnceLock<Mutex<HashMap<u64, String>>> = OnceLock::new();
    P.get_or_init(Default::default)
}

fn plan(py: Python<'_>, d: u64) -> PyResult<Arc<Plan>> {
    if let Some(p) = plans().lock().ok().and_then(|g| g.get(&d).cloned()) {
        return Ok(p);
    }
    let advice = py.detach(|| route::dimension_advice(d));
    let Some(f) = advice
        .options
        .iter()
        .find(|f| f.status == Status::Constructible)
    else {
        let why = if advice.options.is_empty() {
            advice.note.clone()
        } else {
            format!(
                "{} None of these orders is constructible by this program yet.",
                advice.note
            )
        };
        return Err(error(py, "RotationError", (d, why)));
    };
    let dense = build_verified(py, f.dense)?;
    let m = dense.order();
    let signs = to_i8(dense.matrix());
    let p = Arc::new(Plan {
        a: f.power_of_two,
        m,
        dense,
        signs,
    });
    if let Ok(mut g) = plans().lock() {
        g.insert(d, p.clone());
    }
    Ok(p)
}

fn to_i8(m: &Matrix) -> Vec<i8> {
    (0..m.rows())
        .flat_map(|i| (0..m.cols()).map(move |j| m.get(i, j)))
        .collect()
}

/// `rotation_plan(d) -> (a, m, dense_id)`.
#[pyfunction]
fn rotation_plan(py: Python<'_>, d: u64) -> PyResult<(u32, usize, String)> {
    let p = plan(py, d)?;
    Ok((p.a, p.m, p.dense.id().to_owned()))
}

/// The d×d matrix H_m ⊗ H_{2^a}, through core's exact check.
fn rotation_verified(py: Python<'_>, d: u64) -> PyResult<Verified> {
    let p = plan(py, d)?;
    if d > route::MAX_BUILD_ORDER {
        return Err(error(py, "RotationError", (d, format!("the rotation of size {d} is applied, but its d×d matrix is above the build limit {} and is neither built nor checked, so it has no id here", route::MAX_BUILD_ORDER))));
    }
    py.detach(|| {
        let s = sylvester(p.a)?;
        kronecker(&p.dense, &s)
    })
    .map_err(|e| error(py, "HadamardError", (e.to_string(),)))
}

/// `rotation_id(d) -> str`: the id of the exact matrix `rotate` applies (cached per d).
#[pyfunction]
fn rotation_id(py: Python<'_>, d: u64) -> PyResult<String> {
    if let Some(id) = rotation_ids().lock().ok().and_then(|g| g.get(&d).cloned()) {
        return Ok(id);
    }
    let v = rotation_verified(py, d)?;
    let id = v.id().to_owned();
    if let Ok(mut g) = rotation_ids().lock() {
        g.insert(d, id.clone());
    }
    Ok(id)
}

/// `rotation_matrix(d) -> array`: the exact matrix `rotate` applies, as int8.
#[pyfunction]
fn rotation_matrix<'py>(py: Python<'py>, d: u64) -> PyResult<Bound<'py, PyArray2<i8>>> {
    let v = rotation_verified(py, d)?;
    if let Ok(mut g) = rotation_ids().lock() {
        g.insert(d, v.id().to_owned());
    }
    Ok(to_array(py, v.matrix()))
}

/// The arithmetic the rotation needs, for f32 and f64.
trait Real:
    Copy
    + PartialEq
    + Send
    + Sync
    + Add<Output = Self>
    + Sub<Output = Self>
    + Mul<Output = Self>
    + Neg<Output = Self>
    + AddAssign
    + SubAssign
{
    const ZERO: Self;
    const ONE: Self;
    fn from_f64(x: f64) -> Self;
}

impl Real for f32 {
    const ZERO: f32 = 0.0;
    const ONE: f32 = 1.0;
    fn from_f64(x: f64) -> f32 {
        x as f32
    }
}

impl Real for f64 {
    const ZERO: f64 = 0.0;
    const ONE: f64 = 1.0;
    fn from_f64(x: f64) -> f64 {
        x
    }
}

/// In place: x ← H_{2^a}·x, Sylvester's matrix in natural order, by the fast Walsh–Hadamard
/// transform (a butterflies of length-2 sums and differences over strides 1, 2, 4, …; the
/// factorisation H_{2^a} = ∏ (I ⊗ H₂ ⊗ I) is common practice). x.len() is a power of two.
#[inline(always)]
fn fwht<T: Real>(x: &mut [T]) {
    let n = x.len();
    // Strides 1 and 2 together, as a radix-4 pass over blocks of four.
    let mut h = 1;
    if n >= 4 {
        for b in x.chunks_exact_mut(4) {
            let (s0, d0) = (b[0] + b[1], b[0] - b[1]);
            let (s1, d1) = (b[2] + b[3], b[2] - b[3]);
            b[0] = s0 + s1;
            b[1] = d0 + d1;
            b[2] = s0 - s1;
            b[3] = d0 - d1;
        }
        h = 4;
    }
    while h < n {
        for block in x.chunks_exact_mut(2 * h) {
            let (lo, hi) = block.split_at_mut(h);
            for (u, v) in lo.iter_mut().zip(hi.iter_mut()) {
                let (s, t) = (*u, *v);
                *u = s + t;
                *v = s - t;
            }
        }
        h *= 2;
    }
}

/// Columns of the row mix handled together, so the sums stay in registers: 64 f32 sums are
/// eight AVX2 registers. (Measured single-threaded at d = 14336: 32 was slower for f32 and no
/// faster for f64.)
const MIX: usize = 64;

/// out ← scale·(H_m ⊗ H_p)·x for one vector of length d = m·p, p = 2^a. Read x as an m×p
/// matrix X (row-major); then (H_m ⊗ H_p)·vec(X) = vec(H_m·X·H_pᵀ): transform every row of X,
/// then mix the rows with the ±1 entries of H_m, MIX columns at a time so that the sums stay in
/// registers while the m rows stream from L1. `z` is scratch of length d.
#[inline(always)]
fn rotate_one<T: Real>(x: &[T], out: &mut [T], z: &mut [T], p: &Plan, scale: T) {
    let (m, len) = (p.m, 1usize << p.a);
    if m == 1 {
        out.copy_from_slice(x);
        fwht(out);
    } else if len == 1 {
        for (i, o) in out.iter_mut().enumerate() {
            let row = &p.signs[i * m..(i + 1) * m];
            let mut acc = T::ZERO;
            for (&s, &v) in row.iter().zip(x) {
                if s > 0 {
                    acc += v
                } else {
                    acc -= v
                }
            }
            *o = acc;
        }
    } else {
        z.copy_from_slice(x);
        for row in z.chunks_exact_mut(len) {
            fwht(row);
        }
        if len % MIX == 0 {
            for c0 in (0..len).step_by(MIX) {
                for i in 0..m {
                    let signs = &p.signs[i * m..(i + 1) * m];
                    let mut acc = [T::ZERO; MIX];
                    for (j, &s) in signs.iter().enumerate() {
                        let zj: &[T; MIX] = z[j * len + c0..j * len + c0 + MIX]
                            .try_into()
                            .expect("MIX entries");
                        if s > 0 {
                            for k in 0..MIX {
                                acc[k] += zj[k];
                            }
                        } else {
                            for k in 0..MIX {
                                acc[k] -= zj[k];
                            }
                        }
                    }
                    out[i * len + c0..i * len + c0 + MIX].copy_from_slice(&acc);
                }
            }
        } else {
            for (i, y) in out.chunks_exact_mut(len).enumerate() {
                let signs = &p.signs[i * m..(i + 1) * m];
                y.fill(T::ZERO);
                for (j, &s) in signs.iter().enumerate() {
                    let zj = &z[j * len..(j + 1) * len];
                    if s > 0 {
                        for (o, &v) in y.iter_mut().zip(zj) {
                            *o += v;
                        }
                    } else {
                        for (o, &v) in y.iter_mut().zip(zj) {
                            *o -= v;
                        }
                    }
                }
            }
        }
    }
    if scale != T::ONE {
        for o in out.iter_mut() {
            *o = *o * scale;
        }
    }
}

/// [`rotate_one`] compiled for AVX2 (eight f32 or four f64 lanes instead of SSE2's four or
/// two), chosen at run time.
#[cfg(target_arch = "x86_64")]
#[target_feature(enable = "avx2")]
unsafe fn rotate_one_avx2<T: Real>(x: &[T], out: &mut [T], z: &mut [T], p: &Plan, scale: T) {
    rotate_one(x, out, z, p, scale)
}

fn rotate_vector<T: Real>(x: &[T], out: &mut [T], z: &mut [T], p: &Plan, scale: T) {
    #[cfg(target_arch = "x86_64")]
    if std::arch::is_x86_feature_detected!("avx2") {
        // SAFETY: the CPU has AVX2, checked on the line above.
        return unsafe { rotate_one_avx2(x, out, z, p, scale) };
    }
    rotate_one(x, out, z, p, scale)
}

/// Below this many entries in a batch the rotation stays on the calling thread.
const PARALLEL_ENTRIES: usize = 1 << 16;

fn rotate_batch<T: Real>(x: &[T], out: &mut [T], d: usize, p: &Plan, normalized: bool) {
    let scale = if normalized {
        T::from_f64(1.0 / (d as f64).sqrt())
    } else {
        T::ONE
    };
    if x.len() < PARALLEL_ENTRIES || x.len() == d {
        let mut z = vec![T::ZERO; d];
        for (xi, oi) in x.chunks_exact(d).zip(out.chunks_exact_mut(d)) {
            rotate_vector(xi, oi, &mut z, p, scale);
        }
    } else {
        x.par_chunks_exact(d)
            .zip(out.par_chunks_exact_mut(d))
            .for_each_init(
                || vec![T::ZERO; d],
                |z, (xi, oi)| rotate_vector(xi, oi, z, p, scale),
            );
    }
}

fn rotate_any<'py, T: Real + numpy::Element>(
    py: Python<'py>,
    x: PyReadonlyArray2<'py, T>,
    normalized: bool,
) -> PyResult<Bound<'py, PyArray2<T>>> {
    let (b, d) = (x.shape()[0], x.shape()[1]);
    let p = plan(py, d as u64)?;
    let xs = x.as_slice()?;
    let mut out = vec![T::ZERO; b * d];
    if d > 0 {
        py.detach(|| rotate_batch(xs, &mut out, d, &p, normalized));
    }
    Ok(Array2::from_shape_vec((b, d), out)
        .expect("b·d entries")
        .into_pyarray(py))
}

/// `rotate_f64(x, normalized)`: every row of the C-contiguous batch x rotated.
#[pyfunction]
fn rotate_f64<'py>(
    py: Python<'py>,
    x: PyReadonlyArray2<'py, f64>,
    normalized: bool,
) -> PyResult<Bound<'py, PyArray2<f64>>> {
    rotate_any(py, x, normalized)
}

/// `rotate_f32(x, normalized)`: the same in single precision.
#[pyfunction]
fn rotate_f32<'py>(
    py: Python<'py>,
    x: PyReadonlyArray2<'py, f32>,
    normalized: bool,
) -> PyResult<Bound<'py, PyArray2<f32>>> {
    rotate_any(py, x, normalized)
}

// ---------------------------------------------------------------------------------------------
// Derived objects.

fn derive_error(py: Python<'_>, e: DeriveError) -> PyErr {
    error(py, "DeriveError", (e.parameter, e.message))
}

/// The source matrix: a given ±1 array (checked exactly) or the catalogue's matrix of order n.
fn source(
    py: Python<'_>,
    order: Option<u64>,
    matrix: Option<PyReadonlyArray2<'_, i8>>,
) -> PyResult<Verified> {
    match (matrix, order) {
        (Some(a), _) => {
            let m = from_array(&a)?;
            py.detach(|| certify(m)).map_err(|r| {
                error(
                    py,
                    "NotHadamardError",
                    (format!("the matrix given is not Hadamard ({} of its row pairs are not orthogonal, or it is not square); verify() says where", r.failing_pairs_total),),
                )
            })
        }
        (None, Some(n)) => build_verified(py, n),
        (None, None) => Err(error(
            py,
            "HadamardError",
            ("give an order or a matrix".to_owned(),),
        )),
    }
}

/// `screening_json(...) -> str`: what `hadamard derive screening --json` prints.
#[pyfunction]
#[allow(clippy::too_many_arguments)]
fn screening_json(
    py: Python<'_>,
    order: Option<u64>,
    matrix: Option<PyReadonlyArray2<'_, i8>>,
    factors: Option<usize>,
    columns: Option<Vec<usize>>,
    names: Option<Vec<String>>,
    levels: Option<Vec<(String, String)>>,
    fold_over: bool,
    centre_points: usize,
    seed: Option<u64>,
) -> PyResult<String> {
    let h = source(py, order, matrix)?;
    let cfg = ScreeningConfig {
        factors,
        columns,
        names,
        levels,
        fold_over,
        centre_points,
        seed,
    };
    let d = py
        .detach(|| screening_design(&h, &cfg))
        .map_err(|e| derive_error(py, e))?;
    Ok(to_json(&d))
}

/// `brr_json(strata, order, matrix) -> str`: what `hadamard derive brr --json` prints. With
/// neither an order nor a matrix, the smallest constructible order above the strata is used and
/// the answer names it beside the smallest known one, as the CLI's does.
#[pyfunction]
fn brr_json(
    py: Python<'_>,
    strata: usize,
    order: Option<u64>,
    matrix: Option<PyReadonlyArray2<'_, i8>>,
) -> PyResult<String> {
    let mut chosen = None;
    let h = if order.is_some() || matrix.is_some() {
        source(py, order, matrix)?
    } else {
        let k = strata as u64;
        let (known, built, _) = py.detach(|| json::smallest_at_least(k + 1));
        let Some(built) = built else {
            return Err(error(
                py,
                "DeriveError",
                (
                    "strata",
                    format!("no order greater than {k} is within this program's reach"),
                ),
            ));
        };
        chosen = Some((known.map(|i| i.order), built.order));
        build_verified(py, built.order)?
    };
    let r = py
        .detach(|| replication(&h, strata))
        .map_err(|e| derive_error(py, e))?;
    let mut v = serde_json::to_value(&r).unwrap_or_default();
    if let (Some((known, built)), Some(o)) = (chosen, v.as_object_mut()) {
        o.insert("smallest_known_order".into(), serde_json::json!(known));
        o.insert(
            "smallest_constructible_order".into(),
            serde_json::json!(built),
        );
    }
    Ok(to_json(&v))
}

/// The largest order accepted for arrays (the Python half checks it before calling).
#[pyfunction]
fn max_order() -> usize {
    MAX_ORDER
}

#[pymodule]
fn _native(m: &Bound<'_, PyModule>) -> PyResult<()> {
    m.add_function(wrap_pyfunction!(build, m)?)?;
    m.add_function(wrap_pyfunction!(verify_array, m)?)?;
    m.add_function(wrap_pyfunction!(verify_path, m)?)?;
    m.add_function(wrap_pyfunction!(routes_json, m)?)?;
    m.add_function(wrap_pyfunction!(advice_json, m)?)?;
    m.add_function(wrap_pyfunction!(at_least_json, m)?)?;
    m.add_function(wrap_pyfunction!(rotation_plan, m)?)?;
    m.add_function(wrap_pyfunction!(rotation_id, m)?)?;
    m.add_function(wrap_pyfunction!(rotation_matrix, m)?)?;
    m.add_function(wrap_pyfunction!(rotate_f64, m)?)?;
    m.add_function(wrap_pyfunction!(rotate_f32, m)?)?;
    m.add_function(wrap_pyfunction!(screening_json, m)?)?;
    m.add_function(wrap_pyfunction!(brr_json, m)?)?;
    m.add_function(wrap_pyfunction!(max_order, m)?)?;
    Ok(())
}
