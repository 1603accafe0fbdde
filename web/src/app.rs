//! The app's root: mounts the page.

use leptos::prelude::*;

/// Mounts the app on the page's `<main id="app">`.
pub fn start() {
    console_error_panic_hook_set();
    leptos::mount::mount_to_body(App);
}

fn console_error_panic_hook_set() {
    std::panic::set_hook(Box::new(|info| {
        web_sys::console::error_1(&format!("panic in the Hadamard Registry app: {info}").into());
    }));
}

#[component]
fn App() -> impl IntoView {
    let (text, set_text) = signal(String::new());
    view! {
        <main>
            <h1>"Hadamard Registry"</h1>
            <label for="paste">"Paste a matrix"</label>
            <textarea id="paste" on:input=move |ev| set_text.set(event_target_value(&ev))></textarea>
            <p>{move || format!("{} characters", text.get().len())}</p>
        </main>
    }
}
