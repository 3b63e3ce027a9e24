//! The bundled demo layouts read cleanly and describe what their comments say.

use portwright::layout;
use std::path::Path;

#[test]
fn demo_layouts_load() {
    for f in ["layouts/heron-54.toml", "layouts/osprey-98.toml"] {
        let d = layout::load(Path::new(f)).unwrap_or_else(|e| panic!("{e}"));
        assert!(d.ports.len() >= 6, "{f}");
        assert!(d.states.len() >= 2, "{f}");
    }
}
