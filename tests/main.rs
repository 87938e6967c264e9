//! The integration-test binary: verification against published references, the CLI, the bundled
//! examples and regression checks.
mod basement;
mod batch;
mod cli;
mod climate;
mod common;
mod examples;
mod iso13370;
mod plots;
mod regression;
mod schema;
mod sizing;
mod three_d;
mod trust;
mod uncertainty;
mod units;
mod verification;
mod verification3d;
