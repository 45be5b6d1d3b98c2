//! Writers: one [`Document`](super::doc::Document) to each output format.
//!
//! Each writer escapes in exactly one function, for its own format, and passes every
//! [`Inline::Value`](super::doc::Inline::Value) through
//! [`visible`](super::doc::visible) first.

pub mod markdown;
pub mod text;
pub mod typst;
