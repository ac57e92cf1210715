// Portable maths: exp, log, log1p, pow, sin, cos, atan, atan2, cbrt and hypot that give the same
// bits on every x86-64 machine, whatever the CPU, the thread and the C library's variant.
//
// Why: glibc picks among several builds of exp, log, pow, sin, cos and atan2 at load time by the
// CPU's features (with and without FMA, for example). Each is accurate to about an ulp, but they
// differ in the last bit now and then, and a t-SNE map is chaotic enough that one such bit in the
// features or the affinities ends as a different map. These functions use only IEEE +, -, *, /
// and sqrt (correctly rounded by the standard) and bit operations, in a fixed order, and the
// solver is compiled with -ffp-contract=off, so nothing is fused behind their back.
//
// Methods (the classic ones; the polynomial coefficients are the minimax ones of fdlibm, Sun
// Microsystems' freely distributable libm):
//   exp(x)    x = k ln2 + r, |r| <= ln2/2 (ln2 split in two so k ln2_hi is exact), then
//             e^r = 1 + r + r c / (2 - c), c = r - r^2 (P1 + r^2 (P2 + ...)), times 2^k
//   log(x)    x = 2^k (1 + f), sqrt(1/2) <= 1 + f < sqrt(2), s = f / (2 + f),
//             log(1 + f) = f - s (f - R(s^2)) in the fdlibm arrangement, plus k ln2 (split)
//   log1p(u)  log(1 + u) corrected by (u - ((1 + u) - 1)) / (1 + u)
//   pow(x, y) for x >= 0 only: exp(y log x); the rounding of y log x grows with it (about 3 |y log x| ulps)
//   sin, cos  x = k pi/2 + r (pi/2 in three 33-bit parts), |r| <= pi/4, odd/even polynomials;
//             meant for |x| < 2^19 (beyond that still deterministic, less accurate)
//   atan(x)   reduced by the breakpoints 7/16, 11/16, 19/16, 39/16 to a polynomial in x^2
//   atan2     atan(|y / x|) placed in its quadrant; atan2(+-0, x >= 0) = +-0, (+-0, x < 0) = +-pi
//   cbrt(x)   a seed from the exponent bits, three Newton steps, then t rounded to 23 bits (so t^2
//             is exact) and one last step
//   hypot     sqrt(a^2 + b^2), scaled when a square would overflow or underflow
// Accuracy (tests/test_solver_portable_math.cpp, against std:: and numpy): exp, log, log1p,
// sin, cos, atan, atan2, cbrt, hypot within kPortableUlps = 2 ulps; pow within 2 + 3 |y log x| ulps.
// Pure functions; any thread.
#pragma once

namespace kith::pm {

constexpr double kPortableUlps = 2.0;  // the accuracy promised above, in units in the last place

double exp(double x);
double log(double x);
double log1p(double x);
double pow(double x, double y);  // x >= 0; x < 0 gives NaN
double sin(double x);
double cos(double x);
double atan(double x);
double atan2(double y, double x);
double cbrt(double x);
double hypot(double a, double b);

}  // namespace kith::pm
