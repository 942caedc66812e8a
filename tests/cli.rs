//! Command-line contract tests (filled in below).
