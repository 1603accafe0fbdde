//! Looking up an order, a dimension or a number of strata, and the page of one order.
//!
//! Everything here comes from the server (`/api/orders/{n}`, `/api/orders/{n}/matrices`,
//! `/api/dimensions/{d}`, `/api/smallest-known`): the route planner and the literature table
//! live in the server's copy of core, not in the bundle. The only arithmetic done here is
//! naming the nearest possible orders around an impossible one.

use crate::api::{self, Reply};
use crate::app::navigate;
use crate::words::{self, method_name, status_label, status_sentence, yields_matrix};
use leptos::prelude::*;
use leptos::task::spawn_local;
use serde_json::Value;

/// What the home page was asked, from its URL.
#[derive(Clone, Debug, PartialEq)]
pub enum Query {
    None,
    Dimension(u64),
    Strata(u64),
}

/// A fetch whose answer lands in a signal (`None` while it is on its way).
pub fn fetch(url: String) -> RwSignal<Option<Result<Reply, String>>> {
    let out = RwSignal::new(None);
    spawn_local(async move { out.set(Some(api::get(&url).await)) });
    out
}

/// How the lookup box reads its number.
#[derive(Clone, Copy, PartialEq)]
enum Kind {
    Order,
    Dimension,
    Strata,
}

/// Reads the lookup box: a number, optionally with a word saying what it is; or a matrix id.
fn parse_lookup(text: &str, chosen: Kind) -> Result<String, String> {
    let t = text.trim().to_lowercase();
    if hadamard_core::id::is_id(&t) {
        return Ok(format!("/m/{t}"));
    }
    let digits: String = t.chars().filter(|c| c.is_ascii_digit()).collect();
    if digits.is_empty() {
        return Err("Type a whole number, such as 92, or a matrix id.".into());
    }
    let Ok(n) = digits.parse::<u64>() else {
        return Err("That number is too large.".into());
    };
    let kind = if t.contains("strat") {
        Kind::Strata
    } else if t.contains("dim") || t.contains("size") || t.starts_with('d') {
        Kind::Dimension
    } else if t.contains("order") || t.starts_with('n') {
        Kind::Order
    } else {
        chosen
    };
    if n == 0 {
        return Err("Orders, dimensions and strata counts start at 1.".into());
    }
    Ok(match kind {
        Kind::Order => format!("/orders/{n}"),
        Kind::Dimension => format!("/?dimension={n}"),
        Kind::Strata => format!("/?strata={n}"),
    })
}

/// The lookup form.
#[component]
pub fn LookupForm(
    #[prop(optional)] initial: String,
    #[prop(optional)] compact: bool,
) -> impl IntoView {
    let text = RwSignal::new(initial);
    let kind = RwSignal::new(Kind::Order);
    let problem = RwSignal::new(None::<String>);
    let submit = move |ev: web_sys::SubmitEvent| {
        ev.prevent_default();
        match parse_lookup(&text.get_untracked(), kind.get_untracked()) {
            Ok(url) => {
                problem.set(None);
                navigate(&url);
            }
            Err(e) => problem.set(Some(e)),
        }
    };
    let radio = move |k: Kind, id: &'static str, label: &'static str| {
        view! {
            <input type="radio" name="lookup-kind" id=id prop:checked=move || kind.get() == k on:change=move |_| kind.set(k) />
            <label for=id>{label}</label>
        }
    };
    view! {
        <form class="lookup" class:compact=compact on:submit=submit role="search">
            <label for="lookup-input" class="big">"Order, dimension or number of strata"</label>
            <div class="row">
                <input id="lookup-input" type="text" inputmode="numeric" autocomplete="off" placeholder="92"
                    aria-describedby="lookup-help"
                    prop:value=move || text.get() on:input=move |ev| text.set(event_target_value(&ev)) />
                <button type="submit" class="primary">"Look up"</button>
            </div>
            <fieldset class="kinds">
                <legend>"Read the number as"</legend>
                {radio(Kind::Order, "kind-order", "an order n")}
                {radio(Kind::Dimension, "kind-dimension", "a dimension (design size)")}
                {radio(Kind::Strata, "kind-strata", "a number of strata")}
            </fieldset>
            <p id="lookup-help" class="help">
                "An order asks whether an n×n Hadamard matrix exists and how to build it. A dimension d asks how to write d as 2^a·m with a "
                "Hadamard order m, for a fast transform. A number of strata k asks for the smallest order that gives a balanced repeated replication design for k strata. "
                "A matrix id opens that matrix."
            </p>
            {move || problem.get().map(|p| view! { <p class="bad" role="alert">{p}</p> })}
        </form>
    }
}

/// The home page: the lookup form, and the answer to a dimension or strata query.
#[component]
pub fn Home(query: Query) -> impl IntoView {
    let (initial, answer) = match query {
        Query::None => (String::new(), None),
        Query::Dimension(d) => (
            format!("dimension {d}"),
            Some(view! { <DimensionAnswer d=d /> }.into_any()),
        ),
        Query::Strata(k) => (
            format!("{k} strata"),
            Some(view! { <StrataAnswer k=k /> }.into_any()),
        ),
    };
    let heading = match query {
        Query::None => "Look up a Hadamard matrix".to_string(),
        Query::Dimension(d) => format!("Dimension {d}"),
        Query::Strata(k) => format!("{k} strata"),
    };
    view! {
        <h1 tabindex="-1">{heading}</h1>
        <section class="card">
            <LookupForm initial=initial />
        </section>
        {answer}
    }
}

fn status_badge(status: &str) -> impl IntoView {
    let class = format!("badge st-{status}");
    view! { <span class=class data-status=status.to_string()>{status_label(status)}</span> }
}

/// A dimension's factorings, ranked by the size of the dense factor.
#[component]
fn DimensionAnswer(d: u64) -> impl IntoView {
    let reply = fetch(format!("/api/dimensions/{d}"));
    view! {
        <section class="card" aria-labelledby="dim-title" aria-live="polite">
            <h2 id="dim-title">{format!("Ways to reach size {d}")}</h2>
            {move || match reply.get() {
                None => view! { <p class="waiting">"Asking the catalogue…"</p> }.into_any(),
                Some(Err(e)) => view! { <p class="bad">{e}</p> }.into_any(),
                Some(Ok(r)) if !r.ok() => view! { <p class="bad">{r.error()}</p> }.into_any(),
                Some(Ok(r)) => {
                    let b = r.body;
                    let note = api::s(&b, "note").unwrap_or_default().to_string();
                    let row = |f: &Value, rank: Option<usize>| {
                        let dense = api::u(f, "dense").unwrap_or(0);
                        let status = api::s(f, "status").unwrap_or("").to_string();
                        let factored = api::s(f, "factored").map(str::to_string).unwrap_or_else(|| format!("2^{} · {dense}", api::u(f, "power_of_two").unwrap_or(0)));
                        view! {
                            <tr>
                                <td>{rank.map(|r| r.to_string()).unwrap_or_else(|| "—".into())}</td>
                                <td>{factored}</td>
                                <td><a href=format!("/orders/{dense}")>{dense.to_string()}</a></td>
                                <td>{status_badge(&status)}</td>
                            </tr>
                        }
                    };
                    let options: Vec<_> = api::arr(&b, "options").iter().enumerate().map(|(i, f)| row(f, Some(i + 1))).collect();
                    let blocked: Vec<_> = api::arr(&b, "blocked").iter().map(|f| row(f, None)).collect();
                    let has_any = !options.is_empty() || !blocked.is_empty();
                    view! {
                        <p class="answer">{note}</p>
                        {has_any.then(|| view! {
                            <div class="table-wrap">
                            <table class="ranked">
                                <caption>"Factorings d = 2^a · m, smallest dense factor m first. Rows without a rank go through an order with no known matrix."</caption>
                                <thead><tr><th scope="col">"Rank"</th><th scope="col">"Factoring"</th><th scope="col">"Dense factor m"</th><th scope="col">"Status of m"</th></tr></thead>
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

/// The smallest order for a balanced repeated replication design with k strata.
#[component]
fn StrataAnswer(k: u64) -> impl IntoView {
    let reply = fetch(format!("/api/smallest-known?at-least={}", k + 1));
    view! {
        <section class="card" aria-labelledby="strata-title" aria-live="polite">
            <h2 id="strata-title">{format!("A design for {k} strata")}</h2>
            <p>
                {format!("Balanced repeated replication with {k} strata uses {k} columns of a Hadamard matrix other than its constant column, so it needs an order of at least {}.", k + 1)}
            </p>
            {move || match reply.get() {
                None => view! { <p class="waiting">"Asking the catalogue…"</p> }.into_any(),
                Some(Err(e)) => view! { <p class="bad">{e}</p> }.into_any(),
                Some(Ok(r)) if !r.ok() => view! { <p class="bad">{r.error()}</p> }.into_any(),
                Some(Ok(r)) => {
                    let info = r.body.get("info").cloned().unwrap_or(r.body.clone());
                    let n = api::u(&info, "order").unwrap_or(0);
                    let status = api::s(&info, "status").unwrap_or("").to_string();
                    view! {
                        <p class="answer">
                            "The smallest known order is "<a href=format!("/orders/{n}")><strong>{n.to_string()}</strong></a>" "
                            {status_badge(&status)}"."
                        </p>
                        <p>{status_sentence(&status, n)}</p>
                    }.into_any()
                }
            }}
        </section>
    }
}

/// One node of a route tree, with its children.
pub fn node_view(v: &Value, top: u64) -> AnyView {
    let method = api::s(v, "method").unwrap_or("").to_string();
    let order = api::u(v, "order").unwrap_or(0);
    let buildable = api::b(v, "buildable").unwrap_or(false);
    let reference = api::s(v, "reference").unwrap_or("").to_string();
    let params = v
        .get("params")
        .and_then(Value::as_object)
        .cloned()
        .unwrap_or_default();
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
    let children: Vec<AnyView> = api::arr(v, "children")
        .iter()
        .map(|c| node_view(c, top))
        .collect();
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

fn route_view(i: usize, r: &Value, n: u64) -> impl IntoView {
    let method = api::s(r, "method").unwrap_or("").to_string();
    let buildable = api::b(r, "buildable").unwrap_or(false);
    let dense = api::u(r, "largest_dense_factor");
    let ingredients: Vec<String> = api::arr(r, "ingredients").iter().map(api::plain).collect();
    let skew = api::b(r, "skew").unwrap_or(false);
    let tree = r.get("tree").map(|t| node_view(t, n));
    let summary = format!("Route {}: {}", i + 1, method_name(&method));
    view! {
        <details class="route" open=i == 0>
            <summary>
                <span class="route-name">{summary}</span>" "
                <span class=if buildable { "tag yes" } else { "tag no" }>{if buildable { "buildable here" } else { "not buildable here yet" }}</span>
                {skew.then(|| view! { " "<span class="tag">"skew"</span> })}
            </summary>
            <p class="route-facts">
                {dense.map(|d| format!("Largest dense factor: {d}. "))}
                {(!ingredients.is_empty()).then(|| format!("Uses: {}.", ingredients.join("; ")))}
            </p>
            {tree.map(|t| view! { <ul class="tree">{t}</ul> })}
        </details>
    }
}

fn properties_tags(p: Option<&Value>) -> impl IntoView {
    let names = ["normalized", "symmetric", "skew", "regular"];
    let on: Vec<&str> = match p {
        Some(p) => names
            .into_iter()
            .filter(|k| api::b(p, k) == Some(true))
            .collect(),
        None => Vec::new(),
    };
    let excess = p.and_then(|p| p.get("excess")).and_then(Value::as_i64);
    view! {
        <span class="props">
            {if on.is_empty() { "no special properties".to_string() } else { on.join(", ") }}
            {excess.map(|e| format!(" · excess {e}"))}
        </span>
    }
}

#[component]
fn StoredMatrices(n: u64) -> impl IntoView {
    let reply = fetch(format!("/api/orders/{n}/matrices"));
    view! {
        <section class="card" aria-labelledby="stored-title" aria-live="polite">
            <h2 id="stored-title">"In the catalogue"</h2>
            {move || match reply.get() {
                None => view! { <p class="waiting">"Looking for stored matrices (a buildable order is built now if none is stored)…"</p> }.into_any(),
                Some(Err(e)) => view! { <p class="bad">{e}</p> }.into_any(),
                Some(Ok(r)) if !r.ok() => view! { <p class="bad">{r.error()}</p> }.into_any(),
                Some(Ok(r)) => {
                    let items: Vec<Value> = match &r.body {
                        Value::Array(a) => a.clone(),
                        b => api::arr(b, "matrices").to_vec(),
                    };
                    if items.is_empty() {
                        return view! { <p>{format!("No matrix of order {n} is stored yet.")}</p> }.into_any();
                    }
                    view! {
                        <ul class="stored">
                            {items.into_iter().map(|m| {
                                let id = api::s(&m, "id").unwrap_or_default().to_string();
                                let short = format!("{}…", &id[..id.len().min(16)]);
                                let prov = match api::s(&m, "origin") {
                                    Some("constructed") => "built by this program".to_string(),
                                    Some("uploaded") => format!("uploaded {}", api::s(&m, "created_at").unwrap_or_default()),
                                    Some(o) => o.to_string(),
                                    None => String::new(),
                                };
                                view! {
                                    <li>
                                        <a class="id" href=format!("/m/{id}")>{short}</a>" "
                                        {properties_tags(m.get("properties"))}
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
    let reply = fetch(format!("/api/orders/{n}"));
    view! {
        <h1 tabindex="-1">{format!("Order {n}")}</h1>
        <section class="card compact-lookup"><LookupForm initial=n.to_string() compact=true /></section>
        <section class="card" aria-labelledby="status-title" aria-live="polite">
            <h2 id="status-title" class="visually-hidden">"Status"</h2>
            {move || match reply.get() {
                None => view! { <p class="waiting">"Asking the catalogue…"</p> }.into_any(),
                Some(Err(e)) => view! { <p class="bad">{e}</p> }.into_any(),
                Some(Ok(r)) if !r.ok() => view! { <p class="bad">{r.error()}</p> }.into_any(),
                Some(Ok(r)) => {
                    let b = r.body;
                    let status = api::s(&b, "status").unwrap_or("").to_string();
                    let note = api::s(&b, "note").unwrap_or_default().to_string();
                    let lit = api::s(&b, "literature").map(str::to_string);
                    let routes: Vec<_> = api::arr(&b, "routes").iter().enumerate().map(|(i, r)| route_view(i, r, n)).collect();
                    let impossible = status == "impossible";
                    let nearest = impossible.then(|| {
                        let (below, above) = words::nearest_orders(n);
                        view! {
                            <p class="why">{words::IMPOSSIBLE_WHY}</p>
                            <p>"Nearest possible orders: "
                                {below.map(|b| view! { <a href=format!("/orders/{b}")>{b.to_string()}</a>" and " })}
                                <a href=format!("/orders/{above}")>{above.to_string()}</a>"."
                            </p>
                        }
                    });
                    let show_stored = usize::try_from(n).is_ok_and(hadamard_core::verify::order_possible) && status != "open";
                    view! {
                        <p class="status-line" id="order-status" data-status=status.clone()>
                            {status_badge(&status)}" "<span>{status_sentence(&status, n)}</span>
                        </p>
                        {(!note.is_empty()).then(|| view! { <p>{note}</p> })}
                        {lit.map(|l| view! { <p class="ref">{format!("Literature: {l}")}</p> })}
                        {nearest}
                        {(!routes.is_empty()).then(|| view! {
                            <h2>"How it can be built"</h2>
                            <p class="help">"Best route first: buildable here, then the smallest dense factor, then the cheapest. Smaller orders a route uses are links."</p>
                            <div class="routes">{routes}</div>
                        })}
                        {show_stored.then(|| view! { <StoredMatrices n=n /> })}
                    }.into_any()
                }
            }}
        </section>
    }
}
