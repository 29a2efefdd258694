// The working precision of the row module and the few operations the rows need in it: every row
// of rows.as.ts and nonlinear.as.ts is written once over `real`, and the build compiles it for
// double (f64, two lanes to a v128) and for float32 (f32, four lanes) with --use REAL=f64|f32
// (wasm/build.ts). The choice is made at compile time (F32 is a constant), so each build holds
// only its own instructions. In both every operation rounds to the working precision, one IEEE
// operation per TypeScript operator, no fused multiply-add.

// @ts-ignore: REAL is given by the build (--use REAL=f64 or REAL=f32)
export type real = REAL;

/** True in the float32 build. */
// @ts-ignore: a compile-time constant
@inline export const F32: bool = sizeof<real>() == 4;
/** Values in one v128. */
// @ts-ignore: a compile-time constant
@inline export const LANES: i32 = F32 ? 4 : 2;
/** log2 of the bytes of a value. */
// @ts-ignore: a compile-time constant
@inline export const SHIFT: i32 = F32 ? 2 : 3;

@inline export function ld(p: usize, k: i32): real {
  return load<real>(p + (<usize>k << SHIFT));
}
@inline export function st(p: usize, k: i32, x: real): void {
  store<real>(p + (<usize>k << SHIFT), x);
}
@inline export function ldv(p: usize, k: i32): v128 {
  return v128.load(p + (<usize>k << SHIFT));
}
@inline export function stv(p: usize, k: i32, x: v128): void {
  v128.store(p + (<usize>k << SHIFT), x);
}
@inline export function ldi(p: usize, n: i32): i32 {
  return load<i32>(p + (<usize>n << 2));
}

@inline export function splat(x: real): v128 {
  return F32 ? f32x4.splat(<f32>x) : f64x2.splat(<f64>x);
}
@inline export function add(a: v128, b: v128): v128 {
  return F32 ? f32x4.add(a, b) : f64x2.add(a, b);
}
@inline export function sub(a: v128, b: v128): v128 {
  return F32 ? f32x4.sub(a, b) : f64x2.sub(a, b);
}
@inline export function mul(a: v128, b: v128): v128 {
  return F32 ? f32x4.mul(a, b) : f64x2.mul(a, b);
}
@inline export function div(a: v128, b: v128): v128 {
  return F32 ? f32x4.div(a, b) : f64x2.div(a, b);
}
@inline export function neg(a: v128): v128 {
  return F32 ? f32x4.neg(a) : f64x2.neg(a);
}
@inline export function lt(a: v128, b: v128): v128 {
  return F32 ? f32x4.lt(a, b) : f64x2.lt(a, b);
}
/** Math.max(x, y) for y not NaN: x when x is NaN (one instruction, unlike f64x2.max). */
@inline export function maxv(x: v128, y: v128): v128 {
  return F32 ? f32x4.pmax(x, y) : f64x2.pmax(x, y);
}
@inline export function maxs(x: real, y: real): real {
  return x < y ? y : x;
}
/** a where the lane of m is set, else b. */
@inline export function pick(a: v128, b: v128, m: v128): v128 {
  return v128.bitselect(a, b, m);
}
/** x where the lane's mask bits are all set, +0 where they are all clear (the TypeScript's `mask ? x : 0`). */
@inline export function keep(x: v128, m: v128): v128 {
  return v128.and(x, m);
}
/** True when every lane's mask is set. */
@inline export function allSet(m: v128): bool {
  return F32 ? i32x4.all_true(m) : i64x2.all_true(m);
}
/** A lane mask of all bits set, or none. */
@inline export function maskSplat(set: bool): v128 {
  return F32 ? i32x4.splat(set ? -1 : 0) : i64x2.splat(set ? -1 : 0);
}
/** The lanes [last of a, first LANES - 1 of b]: a row shifted one column east across two loads. */
@inline export function shiftIn(a: v128, b: v128): v128 {
  return F32 ? v128.shuffle<f32>(a, b, 3, 4, 5, 6) : v128.shuffle<f64>(a, b, 1, 2);
}

/** A mask of a value's width, as the scalar code reads it (all bits set over ocean, none on land). */
@inline export function ldb(p: usize, k: i32): u64 {
  return F32 ? <u64>load<u32>(p + (<usize>k << 2)) : load<u64>(p + (<usize>k << 3));
}
/** The 0/1 value of a mask (1 where all bits are set, +0 where none). */
@inline export function asOne(b: u64): real {
  return F32 ? <real>reinterpret<f32>(<u32>b & 0x3f800000) : <real>reinterpret<f64>(b & 0x3ff0000000000000);
}
