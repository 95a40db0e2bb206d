//! The panic boundary, the thread-local last error, pointer checks, and the status texts.

use crate::status::{status_of, stillsky_status};
use std::cell::RefCell;
use std::ffi::{CStr, c_char};
use std::panic::{AssertUnwindSafe, catch_unwind};

/// A failed call: its status and message.
#[derive(Debug)]
pub struct Failure {
    pub status: stillsky_status,
    pub message: String,
}

impl From<stillsky_core::Error> for Failure {
    fn from(e: stillsky_core::Error) -> Self {
        Failure { status: status_of(&e), message: e.to_string() }
    }
}

impl Failure {
    pub(crate) fn new(status: stillsky_status, message: impl Into<String>) -> Self {
        Failure { status, message: message.into() }
    }
    pub(crate) fn null(arg: &str) -> Self {
        Failure::new(stillsky_status::NullPointer, format!("argument '{arg}' is NULL"))
    }
}

pub(crate) type Res<T = ()> = Result<T, Failure>;

thread_local! {
    static LAST_ERROR: RefCell<String> = const { RefCell::new(String::new()) };
}

fn set_last_error(msg: String) {
    // NUL bytes would cut the C string short; they can only come from user text.
    let msg = if msg.contains('\0') { msg.replace('\0', "\\0") } else { msg };
    LAST_ERROR.with(|e| *e.borrow_mut() = msg);
}

fn panic_text(payload: &(dyn std::any::Any + Send)) -> String {
    if let Some(s) = payload.downcast_ref::<&str>() {
        (*s).to_string()
    } else if let Some(s) = payload.downcast_ref::<String>() {
        s.clone()
    } else {
        "non-text panic payload".into()
    }
}

/// Run the body of an export: a `Failure` becomes its status plus the last-error message
/// (prefixed with the function's name); a panic becomes `INTERNAL` with the panic text.
pub fn guard(func: &str, body: impl FnOnce() -> Res) -> i32 {
    match catch_unwind(AssertUnwindSafe(body)) {
        Ok(Ok(())) => stillsky_status::Ok as i32,
        Ok(Err(f)) => {
            set_last_error(format!("{func}: {}", f.message));
            f.status as i32
        }
        Err(p) => {
            set_last_error(format!("{func}: internal error (caught panic): {}", panic_text(p.as_ref())));
            stillsky_status::Internal as i32
        }
    }
}

/// Like [`guard`] for exports that return a value: a panic gives `fallback`.
pub(crate) fn guard_value<T>(func: &str, fallback: T, body: impl FnOnce() -> T) -> T {
    match catch_unwind(AssertUnwindSafe(body)) {
        Ok(v) => v,
        Err(p) => {
            set_last_error(format!("{func}: internal error (caught panic): {}", panic_text(p.as_ref())));
            fallback
        }
    }
}

/// Borrow `*p`.
///
/// # Safety
/// `p` is NULL or points to a valid `T` that outlives `'a` and is not mutated meanwhile.
pub(crate) unsafe fn deref<'a, T>(p: *const T, arg: &str) -> Res<&'a T> {
    // SAFETY: non-null per the check; validity is the caller's contract.
    unsafe { p.as_ref() }.ok_or_else(|| Failure::null(arg))
}

/// Borrow `*p` mutably.
///
/// # Safety
/// `p` is NULL or points to a valid `T`, not aliased for `'a`.
pub(crate) unsafe fn deref_mut<'a, T>(p: *mut T, arg: &str) -> Res<&'a mut T> {
    // SAFETY: non-null per the check; exclusivity is the caller's contract.
    unsafe { p.as_mut() }.ok_or_else(|| Failure::null(arg))
}

fn check_len<T>(n: usize, arg: &str) -> Res {
    if n.checked_mul(size_of::<T>()).is_none_or(|b| b > isize::MAX as usize) {
        return Err(Failure::new(stillsky_status::TooLarge, format!("length {n} of '{arg}' is too large")));
    }
    Ok(())
}

/// Borrow `n` elements at `p`; `n == 0` gives an empty slice whatever `p` is.
///
/// # Safety
/// If `n > 0`, `p` is NULL or points to `n` valid, initialised elements for `'a`.
pub(crate) unsafe fn slice<'a, T>(p: *const T, n: usize, arg: &str) -> Res<&'a [T]> {
    if n == 0 {
        return Ok(&[]);
    }
    if p.is_null() {
        return Err(Failure::null(arg));
    }
    check_len::<T>(n, arg)?;
    // SAFETY: non-null, length checked against isize::MAX; validity is the caller's contract.
    Ok(unsafe { std::slice::from_raw_parts(p, n) })
}

/// Borrow `n` writable elements at `p`.
///
/// # Safety
/// If `n > 0`, `p` is NULL or points to `n` writable elements, not aliased for `'a`.
pub(crate) unsafe fn slice_mut<'a, T>(p: *mut T, n: usize, arg: &str) -> Res<&'a mut [T]> {
    if n == 0 {
        return Ok(&mut []);
    }
    if p.is_null() {
        return Err(Failure::null(arg));
    }
    check_len::<T>(n, arg)?;
    // SAFETY: as in `slice`, plus exclusivity from the caller's contract.
    Ok(unsafe { std::slice::from_raw_parts_mut(p, n) })
}

/// Borrow a NUL-terminated UTF-8 string.
///
/// # Safety
/// `p` is NULL or points to a NUL-terminated string valid for `'a`.
pub(crate) unsafe fn cstr<'a>(p: *const c_char, arg: &str) -> Res<&'a str> {
    if p.is_null() {
        return Err(Failure::null(arg));
    }
    // SAFETY: non-null and NUL-terminated per the caller's contract.
    unsafe { CStr::from_ptr(p) }.to_str().map_err(|e| {
        Failure::new(stillsky_status::InvalidArgument, format!("argument '{arg}' is not UTF-8: {e}"))
    })
}

/// Copy the calling thread's last error message into `buf` (capacity `len` bytes).
///
/// Returns the length needed to hold the whole message including the terminating NUL; pass
/// `buf = NULL, len = 0` to ask for it. Whenever `buf` is non-NULL and `len > 0` the result is
/// NUL-terminated, truncated (at a UTF-8 character boundary) if it does not fit. The message is
/// the text of the most recent failed call *on this thread*; successful calls leave it as it
/// was. Before any failure it is empty (the function returns 1).
///
/// # Safety
/// `buf` is NULL or points to `len` writable bytes.
#[unsafe(no_mangle)]
pub unsafe extern "C" fn stillsky_last_error_message(buf: *mut c_char, len: usize) -> usize {
    guard_value("stillsky_last_error_message", 0, || {
        // SAFETY: the caller's contract is `copy_text`'s.
        LAST_ERROR.with(|e| unsafe { copy_text(&e.borrow(), buf, len) })
    })
}

/// Copy `msg` into `buf` (capacity `len` bytes) NUL-terminated, truncated at a UTF-8 character
/// boundary if it does not fit; nothing is written when `buf` is NULL or `len` is 0. Returns
/// the length needed for the whole text including the NUL.
///
/// # Safety
/// `buf` is NULL or points to `len` writable bytes.
pub(crate) unsafe fn copy_text(msg: &str, buf: *mut c_char, len: usize) -> usize {
    let needed = msg.len() + 1;
    if buf.is_null() || len == 0 {
        return needed;
    }
    let mut n = msg.len().min(len - 1);
    while !msg.is_char_boundary(n) {
        n -= 1;
    }
    // SAFETY: `buf` has `len` > n bytes per the caller's contract.
    unsafe {
        std::ptr::copy_nonoverlapping(msg.as_ptr().cast::<c_char>(), buf, n);
        *buf.add(n) = 0;
    }
    needed
}

/// A static, NUL-terminated name for a status code ("STILLSKY_STATUS_OK", ...), or
/// "STILLSKY_STATUS_UNKNOWN" for a number that is not a status. Never NULL; do not free.
#[unsafe(no_mangle)]
pub extern "C" fn stillsky_status_str(status: i32) -> *const c_char {
    let unknown = b"STILLSKY_STATUS_UNKNOWN\0";
    guard_value("stillsky_status_str", unknown.as_ptr().cast(), || {
        stillsky_status::from_i32(status).map_or(unknown.as_slice(), |s| s.text()).as_ptr().cast()
    })
}

/// The library version ("MAJOR.MINOR.PATCH"), static and NUL-terminated. Never NULL; do not free.
#[unsafe(no_mangle)]
pub extern "C" fn stillsky_version() -> *const c_char {
    concat!(env!("CARGO_PKG_VERSION"), "\0").as_ptr().cast()
}

#[cfg(test)]
mod tests {
    use super::*;

    fn last() -> String {
        let n = unsafe { stillsky_last_error_message(std::ptr::null_mut(), 0) };
        let mut b = vec![0 as c_char; n];
        unsafe { stillsky_last_error_message(b.as_mut_ptr(), n) };
        unsafe { CStr::from_ptr(b.as_ptr()) }.to_string_lossy().into_owned()
    }

    #[test]
    fn panic_becomes_internal_with_message() {
        let code = guard("probe", || panic!("deliberate test panic"));
        assert_eq!(code, stillsky_status::Internal as i32);
        let m = last();
        assert!(m.contains("probe") && m.contains("deliberate test panic"), "{m}");
        let v = guard_value("probe2", 7usize, || panic!("{}", String::from("owned payload")));
        assert_eq!(v, 7);
        assert!(last().contains("owned payload"));
    }

    #[test]
    fn truncation_keeps_nul_and_char_boundary() {
        set_last_error("ab\u{00e9}cd".into()); // é is 2 bytes
        let mut b = [1 as c_char; 4];
        let n = unsafe { stillsky_last_error_message(b.as_mut_ptr(), 4) };
        assert_eq!(n, 7);
        // 3 bytes would split é: only "ab" fits, then NUL.
        assert_eq!(&b[..3], &[b'a' as c_char, b'b' as c_char, 0]);
        set_last_error("x\0y".into());
        assert_eq!(last(), "x\\0y");
    }
}
