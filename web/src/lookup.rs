//! Looking up an order, a dimension, a number of strata or factors, and the page of one order.
//!
//! The look-up box is read by `hadamard_core::query`, so it means the same as everywhere else;
//! each answer hands over the file for the task on the page itself.
//!
//! Everything here comes from the server (`/api/orders/{n}`, `/api/orders/{n}/matrices`,
//! `/api/dimensions/{d}`, `/api/smallest-known`): the route planner and the literature table
//! live in the server's copy of core, not in the bundle. The only arithmetic done here is
//! naming the nearest possible orders around an impossible one.

use crate::api::{self, Answer};
use crate::app::navigate;
use crate::words::{self, method_name, status_label, status_sentence, yields_matrix};
use hadamard_core::query::{self, Kind, Lookup};
use hadamard_core::route::{Factoring, Status};
use hadamard_core::verify::Properties;
use hadamard_core::wire::{
    name_of, CatalogueMatrix, DimensionAnswer, IdPrefixAnswer, MatrixList, OrderAnswer, Origin,
    RouteView, StepView,
};
use leptos::prelude::*;
use leptos::task::spawn_local;
use serde::de::DeserializeOwned;
use serde_json::Value;

/// What the home page was asked, from its URL.
#[derive(Clone, Debug, PartialEq)]
pub enum Query {
    None,
    Dimension(u64),
    Strata(u64),
    Factors(u64),
}

impl Query {
    /// The kind the look-up box reads a bare number as on this page, so it does not snap back.
    fn kind(&self) -> Kind {
        match self {
            Query::None => Kind::Order,
            Query::Dimension(_) => Kind::Dimension,
            Query::Strata(_) => Kind::Strata,
            Query::Factors(_) => Kind::Factors,
        }
    }
}

/// A fetch whose answer, read as `T`, lands in a signal (`None` while it is on its way).
pub fn fetch<T>(url: String) -> RwSignal<Option<Answer<T>>>
where
    T: DeserializeOwned + Send + Sync + 'static,
{
    let out = RwSignal::new(None);
    spawn_local(async move { out.set(Some(api::get::<T>(&url).await)) });
    out
}

/// The page to open for what the box understood (an id prefix needs the server first).
fn url_of(l: &Lookup) -> Option<String> {
    match l {
        Lookup::Number {
            kind: Kind::Order,
            value,
        } => Some(format!("/orders/{value}")),
        Lookup::Number { kind, value } => Some(format!("/?{}={value}", kind.key())),
        Lookup::Id(id) => Some(format!("/m/{id}")),
        Lookup::IdPrefix(_) => None,
    }
}

/// The look-up form: one box for every question, and a choice of what a bare number means.
#[component]
pub fn LookupForm(
    #[prop(optional)] initial: String,
    #[prop(optional)] kind: Option<Kind>,
    #[prop(optional)] compact: bool,
) -> impl IntoView {
    let text = RwSignal::new(initial);
    let kind = RwSignal::new(kind.unwrap_or(Kind::Order));
    let problem = RwSignal::new(None::<String>);
    let matches = RwSignal::new(Vec::<String>::new());
    // What the box makes of the text, shown as it is typed.
    let understood = Memo::new(move |_| {
        let t = text.get();
        if t.trim().is_empty() {
            return None;
        }
        Some(query::read(&t, kind.get()))
    });
    let submit = move |ev: web_sys::SubmitEvent| {
        ev.prevent_default();
        matches.set(Vec::new());
        match query::read(&text.get_untracked(), kind.get_untracked()) {
            Ok(u) => match url_of(&u.lookup) {
                Some(url) => {
                    problem.set(None);
                    navigate(&url);
                }
                None => {
                    let Lookup::IdPrefix(p) = u.lookup else {
                        return;
                    };
                    problem.set(None);
                    spawn_local(async move {
                        match api::get::<IdPrefixAnswer>(&format!("/api/id-prefix/{p}")).await {
                            Ok(r) => {
                                let ids = r.ids;
                                match ids.as_slice() {
                                    [one] => navigate(&format!("/m/{one}")),
                                    [] => problem.set(Some(format!(
                                        "No stored matrix has an id starting with {p}."
                                    ))),
                                    _ => {
                                        problem.set(Some(format!(
                                            "{} stored matrices have ids starting with {p}: choose one, or type more digits.",
                                            ids.len()
                                        )));
                                        matches.set(ids);
                                    }
                                }
                            }
                            Err(e) => problem.set(Some(e.message)),
                        }
                    });
                }
            },
            Err(e) => problem.set(Some(e)),
        }
    };
    let radio = move |k: Kind, id: &'static str, label: &'static str| {
        // The label wraps its input, so the two wrap onto a new line together.
        view! {
            <label class="choice" for=id>
                <input type="radio" name="lookup-kind" id=id value=k.key() prop:checked=move || kind.get() == k
                    on:change=move |_| kind.set(k) />
                <span>{label}</span>
            </label>
        }
    };
    view! {
        <form class="lookup" class:compact=compact on:submit=submit role="search">
            <label for="lookup-input" class="big">"Order, dimension, strata, factors or a matrix id"</label>
            <div class="row">
                <input id="lookup-input" type="text" autocomplete="off" placeholder="92, 19 factors, 40 strata, dimension 3584"
                    aria-describedby="lookup-understood lookup-help"
                    prop:value=move || text.get() on:input=move |ev| { text.set(event_target_value(&ev)); problem.set(None); } />
                <button type="submit" class="primary">"Look up"</button>
            </div>
            <p id="lookup-understood" class="understood" aria-live="polite">
                {move || match understood.get() {
                    Some(Ok(u)) => u.said,
                    _ => String::new(),
                }}
            </p>
            <fieldset class="kinds">
                <legend>"Read a bare number as"</legend>
                {radio(Kind::Order, "kind-order", "an order n")}
                {radio(Kind::Factors, "kind-factors", "a number of factors (screening design)")}
                {radio(Kind::Strata, "kind-strata", "a number of strata (replicate weights)")}
                {radio(Kind::Dimension, "kind-dimension", "a dimension (fast rotation)")}
            </fieldset>
            <p id="lookup-help" class="help">
                "Words choose for you: “19 factors” asks for a two-level screening design (Plackett–Burman), “40 strata” for balanced repeated replication weights, "
                "“dimension 3584” for a fast Hadamard rotation of that size, “order 92” or “2^12” whether an n×n Hadamard matrix exists. "
                "A matrix id, or its first digits, opens that matrix."
            </p>
            {move || problem.get().map(|p| view! { <p class="bad" role="alert" id="lookup-problem">{p}</p> })}
            {move || {
                let ids = matches.get();
                (!ids.is_empty()).then(|| view! {
                    <ul class="stored" id="lookup-matches">
                        {ids.into_iter().map(|id| view! { <li><a class="id" href=format!("/m/{id}")>{id.clone()}</a></li> }).collect_view()}
                    </ul>
                })
            }}
        </form>
    }
}

/// The home page: the look-up form, and the answer to a dimension, strata or factors query.
#[component]
pub fn Home(query: Query) -> impl IntoView {
    let kind = query.kind();
    let (initial, answer, heading) = match query {
        Query::None => (String::new(), None, "Look up a Hadamard matrix".to_string()),
        Query::Dimension(d) => (
            format!("dimension {d}"),
            Some(view! { <DimensionAnswer d=d /> }.into_any()),
            format!("Dimension {d}: a fast Hadamard rotation"),
        ),
        Query::Strata(k) => (
            format!("{k} strata"),
            Some(view! { <StrataAnswer k=k /> }.into_any()),
            format!("{k} strata: replicate weights"),
        ),
        Query::Factors(k) => (
            format!("{k} factors"),
            Some(view! { <FactorsAnswer k=k /> }.into_any()),
            format!("{k} factors: a screening design"),
        ),
    };
    view! {
        <h1 tabindex="-1">{heading}</h1>
        <section class="card">
            <LookupForm initial=initial kind=kind />
        </section>
        {answer}
    }
}

/// The largest order this server builds (its `--max-order`, in the page's shell).
pub fn max_order() -> u64 {
    crate::app::document()
        .query_selector("meta[name=hadamard-max-order]")
        .ok()
        .flatten()
        .and_then(|m| m.get_attribute("content"))
        .and_then(|c| c.parse().ok())
        .unwrap_or(u64::MAX)
}

/// The catalogue's matrix of order n: its id, fetched (and built on first use) by the server.
fn catalogue_id(
    n: RwSignal<Option<Result<u64, String>>>,
) -> RwSignal<Option<Result<String, String>>> {
    let out = RwSignal::new(None);
    let started = StoredValue::new(false);
    Effect::new(move |_| {
        let Some(Ok(n)) = n.get() else {
            if let Some(Err(e)) = n.get() {
                out.set(Some(Err(e)));
            }
            return;
        };
        if started.get_value() {
            return;
        }
        started.set_value(true);
        spawn_local(async move {
            let got = api::get::<CatalogueMatrix>(&format!("/api/orders/{n}/matrix"))
                .await
                .map(|m| m.id)
                .map_err(|e| e.message);
            out.set(Some(got));
        });
    });
    out
}

/// The smallest order ≥ at_least that this program builds, from the server.
fn smallest_buildable(at_least: u64) -> RwSignal<Option<Result<u64, String>>> {
    let out = RwSignal::new(None);
    spawn_local(async move {
        let got = api::get::<OrderAnswer>(&format!(
            "/api/smallest-known?at-least={at_least}&constructible=true"
        ))
        .await
        .map(|info| info.order)
        .map_err(|e| e.message);
        out.set(Some(got));
    });
    out
}

/// The file name the server gives the catalogue matrix's int8 `.npy` download.
fn npy_name(n: u64, id: &str) -> String {
    format!("hadamard-{n}-{}-int8.npy", &id[..id.len().min(12)])
}

/// A screening design for k factors: the order, and the design itself to download.
#[component]
fn FactorsAnswer(k: u64) -> impl IntoView {
    let runs = query::screening_runs(k);
    let order = smallest_buildable(k + 1);
    let id = catalogue_id(order);
    view! {
        <section class="card" aria-labelledby="factors-title" aria-live="polite">
            <h2 id="factors-title">{format!("A two-level screening design for {k} factor{}", if k == 1 { "" } else { "s" })}</h2>
            <p>
                {format!("A Plackett–Burman design takes its columns from a Hadamard matrix of order n, a multiple of 4, and studies up to n − 1 factors in n runs. \
                For {k} factor{} the smallest such n is {runs}.", if k == 1 { "" } else { "s" })}
            </p>
            {move || match (order.get(), id.get()) {
                (None, _) | (Some(Ok(_)), None) => view! { <p class="waiting">"Building the design…"</p> }.into_any(),
                (Some(Err(e)), _) | (_, Some(Err(e))) => view! { <p class="bad">{e}</p> }.into_any(),
                (Some(Ok(n)), Some(Ok(id))) => {
                    let base = format!("/api/matrices/{id}/derive/screening?factors={k}&format=csv");
                    let seed = u32::from_str_radix(id.get(..8).unwrap_or("1"), 16).unwrap_or(1);
                    let spare = n - 1 - k;
                    view! {
                        {(n != runs).then(|| view! {
                            <p class="help">{format!("This program does not build order {runs}, so the design below uses order {n}, the smallest it builds above {k}.")}</p>
                        })}
                        <p class="answer" id="factors-answer" data-order=n>
                            <strong>{format!("{n} runs")}</strong>{format!(" for {k} factors, from ")}
                            <a href=format!("/m/{id}")>{format!("the catalogue's Hadamard matrix of order {n}")}</a>
                            {if spare > 0 { format!(", leaving {spare} column{} unused (use them to estimate error).", if spare == 1 { "" } else { "s" }) } else { ".".to_string() }}
                        </p>
                        <ul class="downloads task">
                            <li>
                                <a class="button primary" href=base.clone() download="" data-task="screening">{format!("Download the design: {n} runs × {k} factors (.csv)")}</a>
                                <span class="conv">"Columns A, B, … coded −1 (low) and +1 (high), runs in standard order. Every pair of columns is orthogonal and each column is balanced."</span>
                            </li>
                            <li>
                                <a href=format!("{base}&seed={seed}") download="" data-task="screening-random">"The same in a random run order (.csv)"</a>
                                <span class="conv">{format!("Shuffled with seed {seed}, which the file states, so the order can be replayed.")}</span>
                            </li>
                            <li>
                                <a href=format!("{base}&fold-over=true") download="" data-task="screening-foldover">{format!("With fold-over: {} runs (.csv)", 2 * n)}</a>
                                <span class="conv">"The sign-reversed runs appended: main effects are then free of two-factor interactions."</span>
                            </li>
                        </ul>
                        <p class="help">"The matrix page offers names, levels and centre points through the API ("<code>"names=…&levels=…"</code>")."</p>
                    }.into_any()
                }
            }}
        </section>
    }
}

/// Replicate weights for balanced repeated replication with k strata.
#[component]
fn StrataAnswer(k: u64) -> impl IntoView {
    let order = smallest_buildable(k + 1);
    view! {
        <section class="card" aria-labelledby="strata-title" aria-live="polite">
            <h2 id="strata-title">{format!("Replicate weights for {k} strata")}</h2>
            <p>
                {format!("Balanced repeated replication with {k} strata (two primary sampling units each) uses {k} columns of a Hadamard matrix other than its constant column, so it needs an order of at least {}; the order is the number of replicates.", k + 1)}
            </p>
            {move || match order.get() {
                None => view! { <p class="waiting">"Asking the catalogue…"</p> }.into_any(),
                Some(Err(e)) => view! { <p class="bad">{e}</p> }.into_any(),
                Some(Ok(n)) => view! {
                    <p class="answer">
                        {format!("{n} replicates, from the smallest order above {k} that this program builds: ")}
                        <a href=format!("/orders/{n}")><strong>{n.to_string()}</strong></a>"."
                    </p>
                    <ul class="downloads task">
                        <li>
                            <a class="button primary" href=format!("/api/brr?strata={k}&format=csv") download="" data-task="brr">
                                {format!("Download the replicate signs: {n} replicates × {k} strata (.csv)")}
                            </a>
                            <span class="conv">"One row per replicate, one column per stratum: +1 keeps the stratum's first unit (weight doubled), −1 its second. The columns are balanced and orthogonal."</span>
                        </li>
                        <li>
                            <a href=format!("/api/brr?strata={k}")>"The same as JSON, with its checks"</a>
                        </li>
                    </ul>
                }.into_any(),
            }}
        </section>
    }
}

fn status_badge(status: &str) -> impl IntoView {
    let class = format!("badge st-{status}");
    view! { <span class=class data-status=status.to_string()>{status_label(status)}</span> }
}

/// The NumPy snippet that applies H_d/√d for d = 2^a·m in O(d log d + d·m) and checks it.
pub fn numpy_snippet(a: u32, m: u64, file: &str) -> String {
    let d = (1u64 << a) * m;
    format!(
        r#"import numpy as np

# H_d = H_(2^a) ⊗ H_m with d = 2^{a} · {m} = {d}; H_(2^a) is Sylvester's, never stored.
a, d = {a}, {d}
Hm = np.load("{file}").astype(np.float64)    # the factor H_m, {m}×{m}, entries ±1
m = Hm.shape[0]

def fwht(x):
    """Sylvester's H_(2^a) @ x along axis 0, in O(2^a · a) additions per column."""
    n, h = x.shape[0], 1
    while h < n:
        y = x.reshape(n // (2 * h), 2, h, -1)
        x = np.concatenate([y[:, 0] + y[:, 1], y[:, 0] - y[:, 1]], axis=1).reshape(n, -1)
        h *= 2
    return x

def rotate(x):
    """H_d x / sqrt(d) for x of shape (d,) or (d, batch): an orthogonal rotation."""
    X = fwht(x.reshape(2**a, -1)).reshape(2**a, m, -1)    # the 2^a part, fast
    Y = np.einsum("ij,ajb->aib", Hm, X)                    # the small dense factor
    return Y.reshape(x.shape) / np.sqrt(d)

# Check: lengths are kept, and a column equals the Kronecker product's column.
x = np.random.default_rng(0).standard_normal(d)
assert np.isclose(np.linalg.norm(rotate(x)), np.linalg.norm(x))
S = np.ones((1, 1))
for _ in range(a):
    S = np.block([[S, S], [S, -S]])
j = d // 3
e = np.zeros(d); e[j] = 1.0
assert np.allclose(rotate(e) * np.sqrt(d), np.kron(S[:, j // m], Hm[:, j % m]))
print("rotation of dimension", d, "checked")
"#
    )
}

/// The PyTorch form of the same rotation.
pub fn torch_snippet(a: u32, m: u64, file: &str) -> String {
    let d = (1u64 << a) * m;
    format!(
        r#"import numpy as np, torch

a, d = {a}, {d}                                     # d = 2^{a} · {m}
Hm = torch.from_numpy(np.load("{file}").astype(np.float32))
m = Hm.shape[0]

def fwht(x):                                        # Sylvester's H_(2^a) @ x along dim 0
    n, h = x.shape[0], 1
    while h < n:
        y = x.reshape(n // (2 * h), 2, h, -1)
        x = torch.cat([y[:, 0] + y[:, 1], y[:, 0] - y[:, 1]], dim=1).reshape(n, -1)
        h *= 2
    return x

def rotate(x):                                      # H_d x / sqrt(d), x: (d,) or (d, batch)
    X = fwht(x.reshape(2**a, -1)).reshape(2**a, m, -1)
    Y = torch.einsum("ij,ajb->aib", Hm.to(x.dtype), X)
    return Y.reshape(x.shape) / d**0.5

x = torch.randn(d, 8)
assert torch.allclose(rotate(x).norm(dim=0), x.norm(dim=0), rtol=1e-4)
"#
    )
}

/// How to use the best factoring: the factors to download and code that applies the rotation.
#[component]
fn UseIt(d: u64, a: u32, m: u64) -> impl IntoView {
    let max = max_order();
    let two = 1u64 << a;
    let dense_ok = m <= max;
    let order = RwSignal::new(dense_ok.then_some(Ok(m)));
    let id = catalogue_id(order);
    view! {
        <section class="card use-it" aria-labelledby="use-title" id="use-it">
            <h2 id="use-title">"Use it"</h2>
            <p class="answer" id="use-factoring" data-a=a data-m=m>
                {format!("{d} = 2^{a} · {m}, so H_{d} = H_{two} ⊗ H_{m}: Sylvester's matrix of order {two} (applied by the fast Walsh–Hadamard transform, never stored) and a Hadamard matrix of order {m}, multiplied densely. Applying it costs about d·({a} + {m}) additions instead of d².")}
            </p>
            {(d > max).then(|| view! {
                <p class="notice" id="dimension-limit">
                    {format!("This server builds matrices up to order {max}, and {d} is above that: it does not build H_{d} as one matrix. You do not need it: the two factors below are all the rotation uses. ")}
                    "The command line builds the whole matrix with "<code>{format!("hadamard build {d} --format npy -o h{d}.npy")}</code>"."
                </p>
            })}
            <h3>"The factors"</h3>
            <ul class="downloads">
                <li>
                    {if dense_ok {
                        view! {
                            <span>
                                <a href=format!("/api/orders/{m}/matrix/download?format=npy") download="" data-factor="dense">{format!("Factor H_{m}, NumPy int8 (.npy)")}</a>
                                " · "<a href=format!("/api/orders/{m}/matrix/download?format=csv") download="" data-factor="dense-csv">"CSV"</a>
                                " · "<a href=format!("/orders/{m}")>{format!("order {m}")}</a>
                            </span>
                        }.into_any()
                    } else {
                        view! { <span>{format!("Factor H_{m}: above this server's limit of {max}; build it with ")}<code>{format!("hadamard build {m}")}</code></span> }.into_any()
                    }}
                    <span class="conv">"The catalogue's matrix of this order, checked exactly; the snippets load this file."</span>
                </li>
                {(a > 0).then(|| view! {
                    <li>
                        {if two <= max {
                            view! { <a href=format!("/api/orders/{two}/matrix/download?format=npy") download="" data-factor="power">{format!("The catalogue's matrix of order {two} (.npy)")}</a> }.into_any()
                        } else {
                            view! { <span>{format!("Order {two} is above this server's limit; the transform needs no file.")}</span> }.into_any()
                        }}
                        <span class="conv">{format!("Not needed by the snippets: the transform computes Sylvester's H_{two} = H_2 ⊗ … ⊗ H_2 ({a} times) in natural order as it goes.")}</span>
                    </li>
                })}
            </ul>
            {move || match id.get() {
                None if dense_ok => view! { <p class="waiting">"Fetching the factor's id for the snippets…"</p> }.into_any(),
                Some(Err(e)) => view! { <p class="bad">{e}</p> }.into_any(),
                _ => {
                    let file = match id.get() {
                        Some(Ok(id)) => npy_name(m, &id),
                        _ => format!("hadamard-{m}.npy"),
                    };
                    view! {
                        <h3>"NumPy"</h3>
                        <div class="table-wrap"><pre class="snippet" id="snippet-numpy" data-file=file.clone()>{numpy_snippet(a, m, &file)}</pre></div>
                        <h3>"PyTorch"</h3>
                        <div class="table-wrap"><pre class="snippet" id="snippet-torch">{torch_snippet(a, m, &file)}</pre></div>
                    }.into_any()
                }
            }}
        </section>
    }
}

/// A dimension's factorings, ranked by the size of the Hadamard factor m.
#[component]
fn DimensionAnswer(d: u64) -> impl IntoView {
    let reply = fetch::<DimensionAnswer>(format!("/api/dimensions/{d}"));
    let max = max_order();
    view! {
        {move || match reply.get() {
            Some(Ok(advice)) => {
                let best = advice.options.first().and_then(|f| {
                    (f.status == Status::Constructible).then_some((f.power_of_two, f.dense))
                });
                best.map(|(a, m)| view! { <UseIt d=d a=a m=m /> })
            }
            _ => None,
        }}
        <section class="card" aria-labelledby="dim-title" aria-live="polite">
            <h2 id="dim-title">{format!("Every way to reach size {d}")}</h2>
            {move || match reply.get() {
                None => view! { <p class="waiting">"Asking the catalogue…"</p> }.into_any(),
                Some(Err(e)) => view! { <p class="bad">{e.message}</p> }.into_any(),
                Some(Ok(b)) => {
                    let note = b.note.clone();
                    let row = |f: &Factoring, rank: Option<usize>| {
                        let dense = f.dense;
                        let status = name_of(&f.status);
                        let factored = f.factored.clone();
                        let file = if status == "constructible" && dense <= max {
                            view! { <a href=format!("/api/orders/{dense}/matrix/download?format=npy") download="" data-factor-row=dense>{format!("H_{dense} .npy")}</a> }.into_any()
                        } else if status == "constructible" {
                            view! { <span class="help">{format!("above this server's {max}")}</span> }.into_any()
                        } else {
                            view! { <span class="help">"not built here"</span> }.into_any()
                        };
                        view! {
                            <tr>
                                <td>{rank.map(|r| r.to_string()).unwrap_or_else(|| "—".into())}</td>
                                <td>{factored}</td>
                                <td><a href=format!("/orders/{dense}")>{dense.to_string()}</a></td>
                                <td>{status_badge(&status)}</td>
                                <td>{file}</td>
                            </tr>
                        }
                    };
                    let options: Vec<_> = b.options.iter().enumerate().map(|(i, f)| row(f, Some(i + 1))).collect();
                    let blocked: Vec<_> = b.blocked.iter().map(|f| row(f, None)).collect();
                    let has_any = !options.is_empty() || !blocked.is_empty();
                    view! {
                        <p class="answer">{note}</p>
                        {has_any.then(|| view! {
                            <div class="table-wrap" tabindex="0" role="region" aria-label="Factorings (scrolls sideways on a narrow screen)">
                            <table class="ranked">
                                <caption>"Factorings d = 2^a · m, smallest Hadamard factor m first. Rows without a rank go through an order with no known matrix."</caption>
                                <thead><tr><th scope="col">"Rank"</th><th scope="col">"Factoring"</th><th scope="col">"Hadamard factor m"</th><th scope="col">"Status of m"</th><th scope="col">"File"</th></tr></thead>
                                <tbody>{options}{blocked}</tbody>
                            </table>
                            </div>
                        })}
                    }.into_any()
                }
            }}
        </section>
    }
}

/// One node of a route tree, with its children.
pub fn node_view(v: &StepView, top: u64) -> AnyView {
    let method = name_of(&v.method);
    let order = v.order;
    let buildable = v.buildable;
    let reference = v.reference.clone();
    // The parameters are shown generically, as the recipe writes them.
    let params = v.params.clone();
    let kind = params
        .get("kind")
        .and_then(Value::as_str)
        .map(str::to_string);
    let size = if yields_matrix(&method) {
        if order != top && order > 2 {
            view! { <a class="order-link" href=format!("/orders/{order}")>{format!("order {order}")}</a> }.into_any()
        } else {
            view! { <span class="order-tag">{format!("order {order}")}</span> }.into_any()
        }
    } else {
        let what = kind.clone().unwrap_or_else(|| "sequences".into());
        view! { <span class="order-tag">{format!("{what}, index {order}")}</span> }.into_any()
    };
    let shown: Vec<(String, String)> = params
        .iter()
        .filter(|(k, _)| k.as_str() != "kind")
        .map(|(k, val)| {
            let text = match val {
                Value::Array(a) => format!("{} items of data", a.len()),
                Value::Object(o) => format!("{} fields of data", o.len()),
                other => api::plain(other),
            };
            (k.clone(), text)
        })
        .collect();
    let children: Vec<AnyView> = v.children.iter().map(|c| node_view(c, top)).collect();
    view! {
        <li class="node">
            <div class="step">
                <span class="method">{method_name(&method)}</span>" "
                {size}" "
                <span class=if buildable { "tag yes" } else { "tag no" }>{if buildable { "built here" } else { "not built here" }}</span>
                {(!shown.is_empty()).then(|| view! {
                    <span class="params">
                        {shown.into_iter().map(|(k, t)| view! { <span class="param"><span class="k">{k}</span>" = "{t}</span> }).collect_view()}
                    </span>
                })}
                {(!reference.is_empty()).then(|| view! { <span class="ref">{reference}</span> })}
            </div>
            {(!children.is_empty()).then(|| view! { <ul>{children}</ul> })}
        </li>
    }
    .into_any()
}

fn route_view(i: usize, r: &RouteView, n: u64, over: bool) -> impl IntoView {
    let method = name_of(&r.method);
    let buildable = r.buildable;
    let dense = Some(r.largest_dense_factor);
    let ingredients: Vec<String> = r.ingredients.clone();
    let skew = r.skew;
    let tree = Some(node_view(&r.tree, n));
    let summary = format!("Route {}: {}", i + 1, method_name(&method));
    view! {
        <details class="route" open=i == 0>
            <summary>
                <span class="route-name">{summary}</span>" "
                <span class=if buildable && !over { "tag yes" } else { "tag no" }>{match (buildable, over) {
                    (true, false) => "buildable here",
                    (true, true) => "buildable by the command line, above this server's limit",
                    _ => "not buildable here yet",
                }}</span>
                {skew.then(|| view! { " "<span class="tag">"skew"</span> })}
            </summary>
            <p class="route-facts">
                {dense.filter(|&d| d > 1).map(|d| format!("Largest block that is not a power of two: {d} (what a structured transform multiplies densely). "))}
                {(!ingredients.is_empty()).then(|| format!("Uses: {}.", ingredients.join("; ")))}
            </p>
            {tree.map(|t| view! { <ul class="tree">{t}</ul> })}
        </details>
    }
}

fn properties_tags(p: Option<&Properties>) -> impl IntoView {
    let on: Vec<&str> = match p {
        Some(p) => [
            ("normalized", p.normalized),
            ("symmetric", p.symmetric),
            ("skew", p.skew),
            ("regular", p.regular),
        ]
        .into_iter()
        .filter_map(|(k, on)| on.then_some(k))
        .collect(),
        None => Vec::new(),
    };
    let excess = p.map(|p| p.excess);
    view! {
        <span class="props">
            {if on.is_empty() { "no special properties".to_string() } else { on.join(", ") }}
            {excess.map(|e| format!(" · excess {e}"))}
        </span>
    }
}

#[component]
fn StoredMatrices(n: u64) -> impl IntoView {
    let reply = fetch::<MatrixList>(format!("/api/orders/{n}/matrices"));
    view! {
        <section class="card" aria-labelledby="stored-title" aria-live="polite">
            <h2 id="stored-title">"In the catalogue"</h2>
            {move || match reply.get() {
                None => view! { <p class="waiting">"Looking for stored matrices (a buildable order is built now if none is stored)…"</p> }.into_any(),
                Some(Err(e)) => view! { <p class="bad">{e.message}</p> }.into_any(),
                Some(Ok(list)) => {
                    let items = list.matrices;
                    if items.is_empty() {
                        return view! { <p>{format!("No matrix of order {n} is stored yet.")}</p> }.into_any();
                    }
                    view! {
                        <ul class="stored">
                            {items.into_iter().map(|m| {
                                let id = m.id.clone();
                                let short = format!("{}…", &id[..id.len().min(16)]);
                                let prov = match m.origin {
                                    Origin::Constructed => "built by this program".to_string(),
                                    Origin::Uploaded => format!("uploaded {}", m.created_at),
                                };
                                view! {
                                    <li>
                                        <a class="id" href=format!("/m/{id}")>{short}</a>" "
                                        {properties_tags(m.properties.as_ref())}
                                        {(!prov.is_empty()).then(|| view! { <span class="prov">{format!(" · {prov}")}</span> })}
                                    </li>
                                }
                            }).collect_view()}
                        </ul>
                        <p class="help" id="order-derived">
                            "Each matrix's page offers what is made from it: screening designs, Hadamard codes, the symmetric 2-design, sequency and dyadic orders, scaled output, equivalence. "
                            {(n >= 2).then(|| view! {
                                <a href=format!("/api/brr?strata={}&format=csv", n - 1) download="" data-derived="brr">
                                    {format!("Balanced repeated replication for {} strata (.csv)", n - 1)}
                                </a>
                                ", from the smallest order above the number of strata that this program builds."
                            })}
                        </p>
                    }.into_any()
                }
            }}
        </section>
    }
}

/// The page of one order: status, routes, stored matrices.
#[component]
pub fn OrderPage(n: u64) -> impl IntoView {
    let reply = fetch::<OrderAnswer>(format!("/api/orders/{n}"));
    let max = max_order();
    let over = n > max;
    view! {
        <h1 tabindex="-1">{format!("Order {n}")}</h1>
        <section class="card compact-lookup"><LookupForm initial=n.to_string() compact=true kind=Kind::Order /></section>
        <section class="card" aria-labelledby="status-title" aria-live="polite">
            <h2 id="status-title" class="visually-hidden">"Status"</h2>
            {move || match reply.get() {
                None => view! { <p class="waiting">"Asking the catalogue…"</p> }.into_any(),
                Some(Err(e)) => view! { <p class="bad">{e.message}</p> }.into_any(),
                Some(Ok(b)) => {
                    let status = name_of(&b.status);
                    let note = b.note.clone();
                    let lit = b.literature.clone();
                    let routes: Vec<_> = b.routes.iter().enumerate().map(|(i, r)| route_view(i, r, n, over)).collect();
                    let impossible = status == "impossible";
                    let nearest = impossible.then(|| {
                        let (below, above) = words::nearest_orders(n);
                        view! {
                            <p class="why">{words::IMPOSSIBLE_WHY}</p>
                            <p>"Nearest possible orders: "
                                {below.map(|b| view! { <a href=format!("/orders/{b}")>{b.to_string()}</a>" and " })}
                                <a href=format!("/orders/{above}") id="next-order">{above.to_string()}</a>"."
                            </p>
                            {(n >= 2).then(|| {
                                let runs = query::screening_runs(n);
                                view! {
                                    <p id="impossible-tasks">
                                        {format!("Planning an experiment with {n} two-level factors? ")}
                                        <a href=format!("/?factors={n}") data-task="factors">{format!("A screening design for {n} factors has {runs} runs")}</a>
                                        {format!(". Surveying {n} strata? ")}
                                        <a href=format!("/?strata={n}") data-task="strata">{format!("Replicate weights for {n} strata")}</a>"."
                                    </p>
                                }
                            })}
                        }
                    });
                    let constructible_over = over && status == "constructible";
                    let show_stored = usize::try_from(n).is_ok_and(hadamard_core::verify::order_possible) && status != "open" && !over;
                    let sentence = if constructible_over {
                        format!("This program knows how to build a Hadamard matrix of order {n}, but this server builds at most order {max}, so it does not build this one here.")
                    } else {
                        status_sentence(&status, n)
                    };
                    view! {
                        <p class="status-line" id="order-status" data-status=status.clone() data-over-limit=over.to_string()>
                            {if constructible_over { view! { <span class="badge st-known">"above this server's limit"</span> }.into_any() } else { status_badge(&status).into_any() }}" "<span>{sentence}</span>
                        </p>
                        {constructible_over.then(|| view! {
                            <p class="notice" id="order-limit">
                                "Build it on your own machine with "<code>{format!("hadamard build {n} -o h{n}.txt")}</code>
                                " (the first route below is its recipe). For a fast rotation of this size you need only the factors: "
                                <a href=format!("/?dimension={n}")>{format!("dimension {n}: the factors and code")}</a>"."
                            </p>
                        })}
                        {(!note.is_empty()).then(|| view! { <p>{note}</p> })}
                        {lit.map(|l| view! { <p class="ref">{format!("Literature: {l}")}</p> })}
                        {nearest}
                        {(!routes.is_empty()).then(|| view! {
                            <h2>"How it can be built"</h2>
                            <p class="help">"Best route first: buildable here, then the smallest block that is not a power of two, then the cheapest. Smaller orders a route uses are links."</p>
                            <div class="routes">{routes}</div>
                        })}
                        {show_stored.then(|| view! { <StoredMatrices n=n /> })}
                    }.into_any()
                }
            }}
        </section>
    }
}
