//! NIST StRD linear least squares: certified coefficients, standard errors, residual SD, R².
//! Source: NIST ITL Statistical Reference Datasets, "Linear Least Squares Regression"
//! (itl.nist.gov/div898/strd/lls/), values certified to 15 significant digits. Requirement: at
//! least 9 significant digits (LRE >= 9) with our QR solve.

use acceptance::{lre, read_reference};
use linfa::traits::Fit;
use linfa::{Dataset, ParamGuard};
use model::ols::{OlsFit, OlsParams};
use ndarray::Array2;

const MIN_LRE: f64 = 9.0;

fn fit(name: &str, intercept: bool, expand_polynomial: usize) -> OlsFit {
    let (x, y) = read_reference(name);
    let x = if expand_polynomial > 1 {
        Array2::from_shape_fn((x.nrows(), expand_polynomial), |(i, j)| {
            x[[i, 0]].powi(j as i32 + 1)
        })
    } else {
        x
    };
    let params = OlsParams::new().intercept(intercept).check().unwrap();
    params.fit(&Dataset::new(x, y)).unwrap()
}

fn assert_lre(what: &str, computed: f64, certified: f64) {
    let l = lre(computed, certified);
    println!("{what}: computed {computed:e}, certified {certified:e}, LRE {l:.1}");
    assert!(
        l >= MIN_LRE,
        "{what}: LRE {l:.2} < {MIN_LRE} (computed {computed}, certified {certified})"
    );
}

#[test]
fn norris_certified_values() {
    // NIST StRD Norris: y = B0 + B1 x, 36 rows, lower difficulty.
    let f = fit("norris.csv", true, 1);
    assert_lre("Norris B0", f.coefficients()[0], -0.262_323_073_774_029);
    assert_lre("Norris B1", f.coefficients()[1], 1.002_116_818_020_45);
    assert_lre("Norris sd B0", f.std_errors()[0], 0.232_818_234_301_152);
    assert_lre("Norris sd B1", f.std_errors()[1], 0.429_796_848_199_937E-03);
    assert_lre("Norris residual SD", f.residual_sd(), 0.884_796_396_144_373);
    assert_lre("Norris R2", f.r_squared(), 0.999_993_745_883_712);
    assert_lre("Norris SS residual", f.rss(), 26.617_398_529_422_4);
}

#[test]
fn longley_certified_values() {
    // NIST StRD Longley: 6 predictors, 16 rows, higher difficulty (normal equations fail here).
    let f = fit("longley.csv", true, 1);
    let b = [
        -3_482_258.634_595_82,
        15.061_872_271_373_3,
        -0.358_191_792_925_910E-01,
        -2.020_229_803_816_83,
        -1.033_226_867_173_59,
        -0.511_041_056_535_807E-01,
        1_829.151_464_613_55,
    ];
    let sd = [
        890_420.383_607_373,
        84.914_925_774_766_9,
        0.334_910_077_722_432E-01,
        0.488_399_681_651_699,
        0.214_274_163_161_675,
        0.226_073_200_069_370,
        455.478_499_142_212,
    ];
    for k in 0..7 {
        assert_lre(&format!("Longley B{k}"), f.coefficients()[k], b[k]);
        assert_lre(&format!("Longley sd B{k}"), f.std_errors()[k], sd[k]);
    }
    assert_lre("Longley residual SD", f.residual_sd(), 304.854_073_561_965);
    assert_lre("Longley R2", f.r_squared(), 0.995_479_004_577_296);
}

#[test]
fn noint1_certified_values() {
    // NIST StRD NoInt1: y = B1 x, no intercept; R² uses the uncentred total sum of squares.
    let f = fit("noint1.csv", false, 1);
    assert_lre("NoInt1 B1", f.coefficients()[0], 2.074_380_165_289_26);
    assert_lre("NoInt1 sd B1", f.std_errors()[0], 0.165_289_256_198_347E-01);
    assert_lre("NoInt1 residual SD", f.residual_sd(), 3.567_530_340_063_38);
    assert_lre("NoInt1 R2", f.r_squared(), 0.999_365_492_298_663);
    assert_lre("NoInt1 SS residual", f.rss(), 127.272_727_272_727);
}

#[test]
fn noint2_certified_values() {
    // NIST StRD NoInt2: y = B1 x, 3 rows.
    let f = fit("noint2.csv", false, 1);
    assert_lre("NoInt2 B1", f.coefficients()[0], 0.727_272_727_272_727);
    assert_lre("NoInt2 SS residual", f.rss(), 0.272_727_272_727_273);
    assert_lre("NoInt2 MS residual", f.mse(), 0.136_363_636_363_636);
}

#[test]
fn wampler1_certified_values() {
    // NIST StRD Wampler1: fifth-degree polynomial, exact fit; every B = 1, residual SD = 0.
    let f = fit("wampler1.csv", true, 5);
    for k in 0..6 {
        assert_lre(&format!("Wampler1 B{k}"), f.coefficients()[k], 1.0);
    }
    // Certified residual SD is exactly 0: judged on absolute size relative to y's scale (~3e6).
    assert!(
        f.residual_sd() < 1e-6,
        "Wampler1 residual SD {}",
        f.residual_sd()
    );
    assert_lre("Wampler1 R2", f.r_squared(), 1.0);
}
