//! Bad input through the public API: each case is a named `Error` variant whose message
//! contains the offending value (project rules: clear, named errors; never a panic).

use stillsky::spectrum::{Psd, Quantity, ReferenceGround, WelchConfig, WelchStream, welch};
use stillsky::{Error, FreqGrid};

fn check(e: Error, kind: impl Fn(&Error) -> bool, needles: &[&str]) {
    assert!(kind(&e), "unexpected variant: {e:?}");
    let msg = e.to_string();
    for n in needles {
        assert!(msg.contains(n), "message '{msg}' lacks '{n}'");
    }
}

#[test]
fn psd_construction() {
    let grid_err = |e: &Error| matches!(e, Error::InvalidGrid { .. });
    let arg_err = |e: &Error| matches!(e, Error::InvalidArgument { .. });
    let v = || vec![1.0, 1.0, 1.0];
    check(
        Psd::new(vec![1.0, 3.0, 2.0], v(), Quantity::Velocity).unwrap_err(),
        grid_err,
        &["3", "2", "index 2"],
    );
    check(Psd::new(vec![1.0, 2.0, 2.0], v(), Quantity::Velocity).unwrap_err(), grid_err, &["2 at index 1"]);
    check(Psd::new(vec![0.0, 1.0, 2.0], v(), Quantity::Velocity).unwrap_err(), grid_err, &["value 0", "> 0"]);
    check(Psd::new(vec![-1.5, 1.0, 2.0], v(), Quantity::Velocity).unwrap_err(), grid_err, &["-1.5"]);
    check(
        Psd::new(vec![1.0, 2.0, 3.0], vec![1.0, f64::NAN, 1.0], Quantity::Velocity).unwrap_err(),
        arg_err,
        &["NaN"],
    );
    check(
        Psd::new(vec![1.0, 2.0, 3.0], vec![1.0, -2e-9, 1.0], Quantity::Velocity).unwrap_err(),
        arg_err,
        &["-0.000000002"],
    );
    check(
        Psd::new(vec![1.0, 2.0, 3.0], vec![1.0, 1.0], Quantity::Velocity).unwrap_err(),
        |e| matches!(e, Error::ShapeMismatch { expected: 3, got: 2, .. }),
        &["3", "2"],
    );
}

#[test]
fn reference_model_range() {
    let g = FreqGrid::new(vec![0.5, 20.0]).unwrap();
    check(
        ReferenceGround::Nhnm.psd(&g).unwrap_err(),
        |e| matches!(e, Error::OutOfRange { value, .. } if *value == 20.0),
        &["20", "10"],
    );
}

#[test]
fn welch_arguments() {
    let x = vec![0.0; 100];
    let arg_named = |name: &'static str| move |e: &Error| matches!(e, Error::InvalidArgument { name: n, .. } if n == name);
    check(welch(&x, 0.0, &WelchConfig::new(16)).unwrap_err(), arg_named("fs"), &["got 0"]);
    check(welch(&x, 10.0, &WelchConfig::new(256)).unwrap_err(), arg_named("nperseg"), &["256", "100"]);
    check(WelchStream::new(-2.0, &WelchConfig::new(16), 1).unwrap_err(), arg_named("fs"), &["-2"]);
    let mut y = x.clone();
    y[42] = f64::INFINITY;
    check(welch(&y, 10.0, &WelchConfig::new(16)).unwrap_err(), arg_named("x"), &["inf", "index 42"]);
}
