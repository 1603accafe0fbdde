//! The app's root: the page frame, and a small router over `window.location`.
//!
//! The router is hand-rolled because the app has five screens and no nested routes: the
//! location lives in one signal, links are ordinary `<a href>` elements whose clicks a single
//! document listener turns into `history.pushState`, and the back button sets the signal from
//! `popstate`. Every screen therefore has a real URL the server also answers with the app.

use crate::{coverage::Coverage, entry::Entry, lookup, verify::VerifyPanel};
use leptos::prelude::*;
use wasm_bindgen::prelude::*;
use wasm_bindgen::JsCast;

/// The stylesheet, injected once at start so the app needs nothing beyond `web.js`.
const STYLE: &str = include_str!("../style.css");

/// Mounts the app on the page's body.
pub fn start() {
    std::panic::set_hook(Box::new(|info| {
        web_sys::console::error_1(&format!("panic in the Hadamard Registry app: {info}").into());
    }));
    let doc = document();
    if let Ok(style) = doc.create_element("style") {
        style.set_text_content(Some(STYLE));
        if let Some(head) = doc.head() {
            let _ = head.append_child(&style);
        }
    }
    // The shell's "loading" placeholder gives way to the app.
    if let Some(p) = doc.get_element_by_id("boot-loading") {
        p.remove();
    }
    leptos::mount::mount_to_body(App);
}

pub fn window() -> web_sys::Window {
    web_sys::window().expect("the app runs in a browser window")
}

pub fn document() -> web_sys::Document {
    window().document().expect("the window has a document")
}

/// The current location, path and query, as the router sees it. Global rather than a context,
/// because the document's link listener runs outside any reactive owner.
static LOCATION: std::sync::OnceLock<RwSignal<String>> = std::sync::OnceLock::new();

fn current_location() -> String {
    let l = window().location();
    format!(
        "{}{}",
        l.pathname().unwrap_or_default(),
        l.search().unwrap_or_default()
    )
}

/// Goes to an in-app URL (a path with an optional query), adding a history entry.
pub fn navigate(url: &str) {
    if let Ok(h) = window().history() {
        let _ = h.push_state_with_url(&JsValue::NULL, "", Some(url));
    }
    if let Some(loc) = LOCATION.get() {
        loc.set(url.to_string());
    }
    after_navigation();
}

fn after_navigation() {
    window().scroll_to_with_x_and_y(0.0, 0.0);
    // Move focus to the new screen's heading, so a screen reader announces where we are.
    let cb = Closure::once_into_js(|| {
        if let Some(h) = document().query_selector("main h1").ok().flatten() {
            if let Some(h) = h.dyn_ref::<web_sys::HtmlElement>() {
                let _ = h.focus();
            }
        }
    });
    let _ = window().request_animation_frame(cb.unchecked_ref());
}

/// A screen, decoded from a location.
#[derive(Clone, Debug, PartialEq)]
enum Screen {
    Home(lookup::Query),
    Order(u64),
    Coverage,
    Entry(String),
    Verify,
    NotFound,
}

fn query_param(search: &str, key: &str) -> Option<String> {
    search.split('&').find_map(|kv| {
        let (k, v) = kv.split_once('=')?;
        (k == key).then(|| v.replace('+', " "))
    })
}

fn screen_of(location: &str) -> Screen {
    let (path, search) = location.split_once('?').unwrap_or((location, ""));
    let path = path.trim_end_matches('/');
    let parts: Vec<&str> = path.split('/').filter(|s| !s.is_empty()).collect();
    match parts.as_slice() {
        [] => {
            let q = if let Some(d) = query_param(search, "dimension").and_then(|v| v.parse().ok()) {
                lookup::Query::Dimension(d)
            } else if let Some(k) = query_param(search, "strata").and_then(|v| v.parse().ok()) {
                lookup::Query::Strata(k)
            } else if let Some(k) = query_param(search, "factors").and_then(|v| v.parse().ok()) {
                lookup::Query::Factors(k)
            } else {
                lookup::Query::None
            };
            Screen::Home(q)
        }
        ["orders", n] => n.parse().map(Screen::Order).unwrap_or(Screen::NotFound),
        ["coverage"] => Screen::Coverage,
        ["m", id] if hadamard_core::id::is_id(id) => Screen::Entry(id.to_string()),
        ["verify"] => Screen::Verify,
        _ => Screen::NotFound,
    }
}

fn title_of(s: &Screen) -> String {
    let t = match s {
        Screen::Home(lookup::Query::Dimension(d)) => format!("Dimension {d}"),
        Screen::Home(lookup::Query::Strata(k)) => format!("{k} strata"),
        Screen::Home(lookup::Query::Factors(k)) => format!("{k} factors"),
        Screen::Home(_) => "Look up an order".into(),
        Screen::Order(n) => format!("Order {n}"),
        Screen::Coverage => "Coverage".into(),
        Screen::Entry(id) => format!("Matrix {}", &id[..12]),
        Screen::Verify => "Verify a matrix".into(),
        Screen::NotFound => "Not found".into(),
    };
    format!("{t} · Hadamard Registry")
}

/// Turns clicks on in-app links into history navigation (one listener for the whole page).
fn intercept_links() {
    let handler = Closure::<dyn Fn(web_sys::MouseEvent)>::new(|ev: web_sys::MouseEvent| {
        if ev.default_prevented()
            || ev.button() != 0
            || ev.ctrl_key()
            || ev.meta_key()
            || ev.shift_key()
            || ev.alt_key()
        {
            return;
        }
        let Some(target) = ev
            .target()
            .and_then(|t| t.dyn_into::<web_sys::Element>().ok())
        else {
            return;
        };
        let Some(a) = target.closest("a[href]").ok().flatten() else {
            return;
        };
        if a.has_attribute("download") || a.has_attribute("target") {
            return;
        }
        let href = a.get_attribute("href").unwrap_or_default();
        if !href.starts_with('/')
            || href.starts_with("//")
            || href.starts_with("/api/")
            || href.starts_with("/pkg/")
        {
            return;
        }
        ev.prevent_default();
        navigate(&href);
    });
    let _ = document().add_event_listener_with_callback("click", handler.as_ref().unchecked_ref());
    handler.forget();
}

#[component]
fn App() -> impl IntoView {
    let loc = *LOCATION.get_or_init(|| RwSignal::new(current_location()));
    intercept_links();
    let on_pop = Closure::<dyn Fn()>::new(move || loc.set(current_location()));
    let _ = window().add_event_listener_with_callback("popstate", on_pop.as_ref().unchecked_ref());
    on_pop.forget();

    let screen = Memo::new(move |_| screen_of(&loc.get()));
    Effect::new(move |_| document().set_title(&title_of(&screen.get())));
    let current = move |which: &'static str| {
        move || {
            let on = match screen.get() {
                Screen::Home(_) | Screen::Order(_) => which == "lookup",
                Screen::Coverage => which == "coverage",
                Screen::Verify => which == "verify",
                _ => false,
            };
            on.then_some("page")
        }
    };

    view! {
        <a class="skip" href="#content">"Skip to the content"</a>
        <header class="top">
            <a class="brand" href="/" aria-label="Hadamard Registry, home">
                <span class="mark" aria-hidden="true">
                    <i></i><i></i><i></i><i></i><i></i><i class="n"></i><i></i><i class="n"></i>
                    <i></i><i></i><i class="n"></i><i class="n"></i><i></i><i class="n"></i><i class="n"></i><i></i>
                </span>
                <span class="name">"Hadamard Registry"</span>
            </a>
            <nav aria-label="Main">
                <a href="/" aria-current=current("lookup")>"Look up"</a>
                <a href="/coverage" aria-current=current("coverage")>"Coverage"</a>
                <a href="/verify" aria-current=current("verify")>"Verify a matrix"</a>
            </nav>
        </header>
        <main id="content" tabindex="-1">
            {move || match screen.get() {
                Screen::Home(q) => view! {
                    <lookup::Home query=q />
                    <VerifyPanel heading=false />
                }.into_any(),
                Screen::Order(n) => view! { <lookup::OrderPage n=n /> }.into_any(),
                Screen::Coverage => view! { <Coverage /> }.into_any(),
                Screen::Entry(id) => view! { <Entry id=id /> }.into_any(),
                Screen::Verify => view! { <VerifyPanel heading=true /> }.into_any(),
                Screen::NotFound => view! {
                    <h1 tabindex="-1">"Nothing here"</h1>
                    <p>"This address is not a page of the registry. Try "<a href="/">"the lookup"</a>"."</p>
                }.into_any(),
            }}
        </main>
        <footer class="foot">
            <p>
                "A Hadamard matrix of order n has entries ±1 and H·Hᵀ = nI. Every matrix here was checked exactly; "
                "its id is the SHA-256 of its rows written as + and − with a newline after each, so anyone can check a link."
            </p>
        </footer>
    }
}
