//! The stepping loop must not allocate: counted with a wrapping global allocator, per thread
//! (the test harness's own threads may allocate meanwhile).

use std::alloc::{GlobalAlloc, Layout, System};
use std::cell::Cell;

mod common;

use dwell_solver::{ControlChannel, Discretization, OnOffThermostat, Readout, Route, Stepper};

struct Counting;

thread_local! {
    static ALLOCATIONS: Cell<usize> = const { Cell::new(0) };
}

fn count() {
    let _ = ALLOCATIONS.try_with(|c| c.set(c.get() + 1));
}

fn allocations() -> usize {
    ALLOCATIONS.with(Cell::get)
}

unsafe impl GlobalAlloc for Counting {
    unsafe fn alloc(&self, layout: Layout) -> *mut u8 {
        count();
        unsafe { System.alloc(layout) }
    }
    unsafe fn dealloc(&self, ptr: *mut u8, layout: Layout) {
        unsafe { System.dealloc(ptr, layout) }
    }
    unsafe fn realloc(&self, ptr: *mut u8, layout: Layout, new_size: usize) -> *mut u8 {
        count();
        unsafe { System.realloc(ptr, layout, new_size) }
    }
}

#[global_allocator]
static GLOBAL: Counting = Counting;

#[test]
fn stepping_and_thermostats_do_not_allocate() {
    // The counter works: a heap allocation is seen.
    let probe = allocations();
    let boxed = std::hint::black_box(Box::new(7_u64));
    assert!(allocations() > probe && *boxed == 7);
    let sys = common::random_network(81, 20, 4, true);
    let (n, m) = (sys.states(), sys.inputs());
    let series = common::input_series(81, m, 500, 0.0, 0.0);
    for route in [Route::Modal, Route::Block] {
        let d = Discretization::new(&sys, 3600.0, route).unwrap();
        let r = Readout::nodes(&[0, 3, 5], n, m);
        let channels = [
            ControlChannel {
                weights: vec![(2, 3000.0)],
                output: 0,
            },
            ControlChannel {
                weights: vec![(3, 2000.0), (4, 500.0)],
                output: 1,
            },
        ];
        let mut s = Stepper::new(&d, &r, &r)
            .unwrap()
            .with_control(&channels)
            .unwrap();
        let mut thermo = OnOffThermostat::new(2, 0.5).unwrap();
        let mut x = vec![10.0; n];
        let mut u = vec![0.0; m];
        let mut f = [0.0; 2];
        let mut sink = 0.0;
        let before = allocations();
        s.set_state(&x);
        for k in 0..500 {
            s.step(&series[k], &series[k + 1]);
            u.copy_from_slice(&series[k]);
            s.step_thermostat(&mut u, &series[k + 1], &[20.0, 18.0], &[true, true], &mut f);
            u.copy_from_slice(&series[k]);
            s.step_on_off(
                &mut thermo,
                &mut u,
                &series[k + 1],
                &[20.0, 18.0],
                &[true, false],
                &mut f,
            );
            sink += s.instant()[0] + s.mean()[2];
            s.state_into(&mut x);
        }
        let after = allocations();
        assert_eq!(
            after - before,
            0,
            "{route:?}: {} allocations while stepping",
            after - before
        );
        assert!(sink.is_finite());
    }
}

/// Block runs allocate their block buffers once per call, before the loop: the count of
/// allocations of a call does not grow with its length (and is small).
#[test]
fn block_runs_allocate_per_call_not_per_step() {
    let sys = common::random_network(82, 20, 4, true);
    let (n, m) = (sys.states(), sys.inputs());
    let series = common::input_series(82, m, 2000, 0.0, 0.0);
    let flat: Vec<f64> = series.iter().flatten().copied().collect();
    for route in [Route::Modal, Route::Block] {
        let d = Discretization::new(&sys, 3600.0, route).unwrap();
        let r = Readout::nodes(&[0, 3, 5], n, m);
        let channels = [ControlChannel {
            weights: vec![(2, 3000.0)],
            output: 0,
        }];
        let mut s = Stepper::new(&d, &r, &r)
            .unwrap()
            .with_control(&channels)
            .unwrap();
        s.set_state(&vec![10.0; n]);
        let mut counts = Vec::new();
        for steps in [100, 2000] {
            let (mut yi, mut ym) = (vec![0.0; steps * 3], vec![0.0; steps * 3]);
            let (sets, mut f) = (vec![19.0; steps], vec![0.0; steps]);
            let u = &flat[..(steps + 1) * m];
            let before = allocations();
            s.run_known(u, &mut yi, &mut ym);
            s.run_thermostat(u, &sets, &[true], &mut f, &mut yi, &mut ym);
            counts.push(allocations() - before);
        }
        assert_eq!(counts[0], counts[1], "{route:?}: allocations {counts:?}");
        assert!(counts[0] <= 8, "{route:?}: allocations {counts:?}");
    }
}
