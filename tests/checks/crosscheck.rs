//! Our QR least squares against linfa-linear's (an independent QR solver) on the same problems.

use acceptance::{demo_market, fit_demo, lre, read_reference};
use linfa::traits::Fit;
use linfa::{Dataset, ParamGuard};
use linfa_linear::LinearRegression;
use model::appraisal::FitSettings;
use model::ols::OlsParams;
use ndarray::{Array1, Array2};

#[test]
fn agrees_with_linfa_linear_on_longley() {
    // NIST StRD Longley data (computed by two libraries, not a certified value): both solvers
    // should agree with each other to at least 9 digits, as each reaches the certified values.
    let (x, y) = read_reference("longley.csv");
    let ours = OlsParams::new()
        .check()
        .unwrap()
        .fit(&Dataset::new(x.clone(), y.clone()))
        .unwrap();
    let theirs = LinearRegression::new().fit(&Dataset::new(x, y)).unwrap();
    assert!(lre(ours.coefficients()[0], theirs.intercept()) >= 9.0);
    for (k, b) in theirs.params().iter().enumerate() {
        let l = lre(ours.coefficients()[k + 1], *b);
        println!("Longley B{}: ours vs linfa-linear LRE {l:.1}", k + 1);
        assert!(
            l >= 9.0,
            "B{}: {} vs {}",
            k + 1,
            ours.coefficients()[k + 1],
            b
        );
    }
}

#[test]
fn agrees_with_linfa_linear_on_the_demo_market_design() {
    let market = demo_market(8_000, 17);
    let fit = fit_demo(&market, "Quellmark", "Tessel", FitSettings::default());
    let rows = &fit.included_rows;
    let p = fit.model.design().width();
    let mut x = Array2::zeros((rows.len(), p - 1));
    let mut y = Array1::zeros(rows.len());
    for (i, &r) in rows.iter().enumerate() {
        let design_row = fit
            .model
            .design_row(&fit.model.attributes_of_row(&market, r));
        for j in 1..p {
            x[[i, j - 1]] = design_row[j];
        }
        y[i] = market.asking_price[r].ln();
    }
    let theirs = LinearRegression::new().fit(&Dataset::new(x, y)).unwrap();
    assert!((fit.model.coefficients()[0] - theirs.intercept()).abs() < 1e-9);
    for (k, b) in theirs.params().iter().enumerate() {
        assert!(
            (fit.model.coefficients()[k + 1] - b).abs() < 1e-9,
            "{}",
            fit.model.design().names[k + 1]
        );
    }
}
