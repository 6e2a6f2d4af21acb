//! Bench: the light-curve diagnostics of one candidate on a 20,000-point
//! light curve (2-minute cadence, about 28 days; an invented star with
//! three transiting signals and red noise), on one core: the whole
//! `diagnose` (the star's trend, then every measurement, the null transits'
//! extra trend and the search over the whole orbit) and `diagnose_detrended`
//! alone (the trend shared by a star's candidates). Target: ≤ 10 ms.
//! Then the browser on the demo while the light-curve pass of every star
//! runs on another thread, as at start-up: each keystroke handled and drawn
//! on a 120x40 TestBackend, p99. Target: ≤ 16 ms.
//!
//! Run: `cargo bench --bench diagnostics`.

use std::time::Instant;

use starsift::demo::Rng;
use starsift::lightcurve::LightCurve;
use starsift::lightcurve::analysis::{
    Context, DetrendSettings, Ephemeris, detrend, diagnose, diagnose_detrended,
};

fn light_curve(signals: &[Ephemeris]) -> LightCurve {
    let mut rng = Rng::new(4242);
    let (mut t, mut f) = (Vec::new(), Vec::new());
    let phi = (-(2.0f64) / 120.0).exp();
    let mut red = 0.0;
    for i in 0..20_000 {
        let ti = 1000.0 + i as f64 * 2.0 / 1440.0;
        let mut v = 1.0 + 0.001 * (ti / 3.0).sin();
        for s in signals {
            if s.offset_d(ti).abs() < s.duration_h / 48.0 {
                v -= 8e-4;
            }
        }
        red = phi * red + (1.0 - phi * phi).sqrt() * 3e-4 * rng.normal();
        t.push(ti);
        f.push(v + red + 3e-4 * rng.normal());
    }
    LightCurve::from_samples("bench".into(), t, f, None).unwrap()
}

fn median_ms(mut runs: Vec<f64>) -> f64 {
    runs.sort_by(f64::total_cmp);
    runs[runs.len() / 2]
}

fn main() {
    let signals = [
        Ephemeris {
            period_d: 3.1,
            epoch: 1001.0,
            duration_h: 2.5,
        },
        Ephemeris {
            period_d: 7.4,
            epoch: 1002.2,
            duration_h: 3.4,
        },
        Ephemeris {
            period_d: 12.9,
            epoch: 1004.1,
            duration_h: 4.1,
        },
    ];
    let lc = light_curve(&signals);
    let ctx = Context {
        ror: 0.028,
        a_rstar: Some(11.0),
        teff_k: Some(5600.0),
        catalogue_depth_ppm: Some(800.0),
        catalogue_snr: Some(30.0),
        star_mass_msun: Some(1.0),
    };
    let settings = DetrendSettings::default();
    let (me, others) = (signals[1], [signals[0], signals[2]]);
    let (mut whole, mut shared) = (Vec::new(), Vec::new());
    let flux = detrend(&lc, &signals, &settings);
    for _ in 0..60 {
        let t0 = Instant::now();
        std::hint::black_box(diagnose(&lc, &me, &others, &ctx, &settings));
        whole.push(t0.elapsed().as_secs_f64() * 1e3);
        let t0 = Instant::now();
        std::hint::black_box(diagnose_detrended(
            &lc, &flux, &me, &others, &ctx, &settings,
        ));
        shared.push(t0.elapsed().as_secs_f64() * 1e3);
    }
    println!(
        "diagnostics of one candidate, 20,000 points: diagnose {:.2} ms (median of 60), \
         with the star's trend shared {:.2} ms; target ≤ 10 ms",
        median_ms(whole),
        median_ms(shared)
    );
    keystrokes_while_light_curves_run();
}

fn keystrokes_while_light_curves_run() {
    use ratatui::Terminal;
    use ratatui::backend::TestBackend;
    use starsift::tui::app::{Action, App, Input};
    use starsift::tui::draw::{Look, Palette, draw};
    let cat = std::sync::Arc::new(starsift::demo::catalogue().expect("demo"));
    let checks = starsift::checks::run(&cat, &Default::default());
    let model = starsift::odds::Model {
        targets: Some(starsift::demo::DEMO_TARGETS),
        ..Default::default()
    };
    let live = starsift::odds::Live::with_state(
        &cat,
        model,
        checks.all_flags().to_vec(),
        checks.groups().clone(),
        vec![starsift::decision::Decision::Open; cat.len()],
    )
    .expect("live");
    let mut app = App::new(
        std::sync::Arc::clone(&cat),
        live,
        checks,
        None,
        "bench".into(),
        starsift::tui::keymap::Keymap::load(&[]).expect("keys"),
    );
    let done = std::sync::Arc::new(std::sync::atomic::AtomicBool::new(false));
    let worker = {
        let (cat, done) = (std::sync::Arc::clone(&cat), std::sync::Arc::clone(&done));
        std::thread::spawn(move || {
            let finder = starsift::lightcurve::Finder {
                demo: true,
                ..Default::default()
            };
            let mut checks = starsift::checks::run(&cat, &Default::default());
            let t = Instant::now();
            let run = starsift::checks::run_lightcurves(
                &cat,
                &finder,
                &DetrendSettings::default(),
                &mut checks,
            );
            done.store(true, std::sync::atomic::Ordering::Relaxed);
            (run.stars, t.elapsed().as_secs_f64())
        })
    };
    let look = Look {
        palette: Palette::Basic,
        ascii: false,
    };
    let mut term = Terminal::new(TestBackend::new(120, 40)).expect("terminal");
    let keys = [
        Action::Down,
        Action::Down,
        Action::NextPane,
        Action::Down,
        Action::PrevPane,
        Action::NextOpen,
    ];
    let mut times = Vec::new();
    let mut i = 0;
    while !done.load(std::sync::atomic::Ordering::Relaxed) {
        let t = Instant::now();
        let _ = app.update(Input::Action(keys[i % keys.len()]));
        term.draw(|f| {
            draw(&app, f, look);
        })
        .expect("draw");
        times.push(t.elapsed().as_secs_f64() * 1e3);
        i += 1;
        std::thread::sleep(std::time::Duration::from_millis(5));
    }
    let (stars, secs) = worker.join().expect("worker");
    times.sort_by(f64::total_cmp);
    let p99 = times[(times.len() * 99 / 100).min(times.len() - 1)];
    println!(
        "browser while the light curves of {stars} demo stars are checked ({secs:.1} s): \
         {} keystrokes, p99 {p99:.2} ms, max {:.2} ms; target p99 ≤ 16 ms",
        times.len(),
        times[times.len() - 1]
    );
}
