//! Placeholder until the scanner lands.
#[derive(Clone, Debug, PartialEq)]
pub(crate) struct ItemSpan {
    pub start: (usize, usize),
    pub end: (usize, usize),
    pub kind: String,
    pub label: Option<String>,
    pub children: Vec<ItemSpan>,
}
pub(crate) fn item_spans(_text: &str) -> Vec<ItemSpan> {
    Vec::new()
}
pub(crate) fn describe_path(_spans: &[ItemSpan], _path: &[usize]) -> Option<String> {
    None
}
