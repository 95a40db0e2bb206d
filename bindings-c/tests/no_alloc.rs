//! `stillsky_monitor_push` (and tick / exposure calls) allocate nothing after creation: a
//! counting global allocator sees zero allocations on this thread across many pushes.

use std::alloc::{GlobalAlloc, Layout, System};
use std::cell::Cell;
use stillsky::*;

struct Counting;

thread_local! {
    static ARMED: Cell<bool> = const { Cell::new(false) };
    static COUNT: Cell<u64> = const { Cell::new(0) };
}

unsafe impl GlobalAlloc for Counting {
    unsafe fn alloc(&self, l: Layout) -> *mut u8 {
        if ARMED.with(|a| a.get()) {
            COUNT.with(|c| c.set(c.get() + 1));
        }
        unsafe { System.alloc(l) }
    }
    unsafe fn dealloc(&self, p: *mut u8, l: Layout) {
        unsafe { System.dealloc(p, l) }
    }
    unsafe fn realloc(&self, p: *mut u8, l: Layout, n: usize) -> *mut u8 {
        if ARMED.with(|a| a.get()) {
            COUNT.with(|c| c.set(c.get() + 1));
        }
        unsafe { System.realloc(p, l, n) }
    }
}

#[global_allocator]
static A: Counting = Counting;

#[test]
fn push_allocates_nothing_after_creation() {
    // A 3-channel calibration (flat, invented) so every FIR path runs.
    let f = [0.5, 100.0];
    let g = [stillsky_complex { re: 1e-6, im: 0.0 }; 2 * 2 * 3];
    let mut cfg = std::mem::MaybeUninit::<stillsky_monitor_config>::uninit();
    assert_eq!(unsafe { stillsky_monitor_config_default(cfg.as_mut_ptr()) }, 0);
    let mut cfg = unsafe { cfg.assume_init() };
    cfg.fir_taps = 256;
    cfg.window_s = 1.0;
    cfg.highpass_hz = 4.0;
    let mut m = std::ptr::null_mut();
    assert_eq!(
        unsafe { stillsky_monitor_from_calibration(f.as_ptr(), 2, 3, g.as_ptr(), 1.0, &cfg, &mut m) },
        0
    );
    let block: Vec<f64> = (0..3 * 20).map(|i| (i as f64 * 0.37).sin()).collect();
    let mut reading = std::mem::MaybeUninit::<stillsky_monitor_reading>::uninit();
    let mut q = std::mem::MaybeUninit::<stillsky_exposure_quality>::uninit();

    ARMED.with(|a| a.set(true));
    let mut ok = true;
    for b in 0..2000 {
        let t0 = b as f64 * 20.0 / cfg.sample_rate_hz;
        ok &= unsafe { stillsky_monitor_push(m, t0, block.as_ptr(), 20, 3) } == 0;
        ok &= unsafe { stillsky_monitor_tick(m, t0 + 0.1, reading.as_mut_ptr()) } == 0;
        if b == 500 {
            ok &= unsafe { stillsky_monitor_exposure_begin(m, t0) } == 0;
        }
        if b == 1500 {
            ok &= unsafe { stillsky_monitor_exposure_end(m, t0, q.as_mut_ptr()) } == 0;
        }
    }
    ARMED.with(|a| a.set(false));
    let n = COUNT.with(|c| c.get());

    assert!(ok, "a call failed");
    let r = unsafe { reading.assume_init() };
    assert_eq!(r.state, stillsky_monitor_state::Quiet);
    assert!(r.rms_arcsec > 0.0);
    assert!(unsafe { q.assume_init() }.coverage > 0.99);
    assert_eq!(n, 0, "{n} allocations during 2000 pushes of 20 samples");
    unsafe { stillsky_monitor_free(m) };
    // The counter works: an allocation while armed is seen.
    ARMED.with(|a| a.set(true));
    let v = std::hint::black_box(vec![1u8; 10]);
    ARMED.with(|a| a.set(false));
    drop(v);
    assert_eq!(COUNT.with(|c| c.get()), 1);
}
