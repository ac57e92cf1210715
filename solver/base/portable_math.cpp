// Portable maths (see portable_math.h). Only +, -, *, /, sqrt and bit operations; the build gives
// this file -ffp-contract=off like all of the solver, so no multiply-add is fused.
#include "solver/base/portable_math.h"

#include <cmath>
#include <cstdint>
#include <cstring>
#include <limits>

namespace kith::pm {
namespace {

inline uint64_t bits_of(double x) {
  uint64_t b;
  std::memcpy(&b, &x, sizeof b);
  return b;
}
inline double from_bits(uint64_t b) {
  double x;
  std::memcpy(&x, &b, sizeof x);
  return x;
}
inline uint32_t high_word(double x) { return uint32_t(bits_of(x) >> 32); }
// 2^k for -1022 <= k <= 1023, exactly.
inline double two_to(int k) { return from_bits(uint64_t(1023 + k) << 52); }

constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();
constexpr double kInf = std::numeric_limits<double>::infinity();
constexpr double kLn2Hi = 6.93147180369123816490e-01;  // ln 2, leading 32 bits: k * kLn2Hi is exact
constexpr double kLn2Lo = 1.90821492927058770002e-10;
constexpr double kInvLn2 = 1.44269504088896338700e+00;
constexpr double kPiHi = 3.1415926535897931160e+00, kPiLo = 1.2246467991473531772e-16;
constexpr double kPiOver2 = 1.57079632679489655800e+00;

// ============================================================================ sin and cos kernels
// On |x| <= pi/4 with x + y the reduced argument (y the tail).
double kernel_sin(double x, double y) {
  constexpr double S1 = -1.66666666666666324348e-01, S2 = 8.33333333332248946124e-03,
                   S3 = -1.98412698298579493134e-04, S4 = 2.75573137070700676789e-06,
                   S5 = -2.50507602534068634195e-08, S6 = 1.58969099521155010221e-10;
  const double z = x * x, v = z * x;
  const double r = S2 + z * (S3 + z * (S4 + z * (S5 + z * S6)));
  return x - ((z * (0.5 * y - v * r) - y) - v * S1);
}
double kernel_cos(double x, double y) {
  constexpr double C1 = 4.16666666666666019037e-02, C2 = -1.38888888888741095749e-03,
                   C3 = 2.48015872894767294178e-05, C4 = -2.75573143513906633035e-07,
                   C5 = 2.08757232129817482790e-09, C6 = -1.13596475577881948265e-11;
  const double z = x * x, w2 = z * z;
  const double r = z * (C1 + z * (C2 + z * C3)) + w2 * w2 * (C4 + z * (C5 + z * C6));
  const double hz = 0.5 * z, w = 1.0 - hz;
  return w + (((1.0 - w) - hz) + (z * r - x * y));
}

// x = n pi/2 + (y0 + y1); returns n. pi/2 in three 33-bit parts, each product with n exact.
int64_t reduce_half_pi(double x, double* y0, double* y1) {
  constexpr double pio2_1 = 1.57079632673412561417e+00, pio2_1t = 6.07710050650619224932e-11,
                   pio2_2 = 6.07710050630396597660e-11, pio2_2t = 2.02226624879595063154e-21,
                   pio2_3 = 2.02226624871116645580e-21, pio2_3t = 8.47842766036889956997e-32;
  constexpr double kInvPio2 = 6.36619772367581382433e-01;
  const double fn = std::floor(x * kInvPio2 + 0.5);
  double r = x - fn * pio2_1;
  double w = fn * pio2_1t;
  const int j = int((high_word(x) >> 20) & 0x7ff);
  *y0 = r - w;
  int i = j - int((high_word(*y0) >> 20) & 0x7ff);
  if (i > 16) {  // cancellation: refine with the next parts
    double t = r;
    w = fn * pio2_2;
    r = t - w;
    w = fn * pio2_2t - ((t - r) - w);
    *y0 = r - w;
    i = j - int((high_word(*y0) >> 20) & 0x7ff);
    if (i > 49) {
      t = r;
      w = fn * pio2_3;
      r = t - w;
      w = fn * pio2_3t - ((t - r) - w);
      *y0 = r - w;
    }
  }
  *y1 = (r - *y0) - w;
  return int64_t(fn);
}

}  // namespace

// ============================================================================ exp
double exp(double x) {
  constexpr double P1 = 1.66666666666666019037e-01, P2 = -2.77777777770155933842e-03,
                   P3 = 6.61375632143793436117e-05, P4 = -1.65339022054652515390e-06,
                   P5 = 4.13813679705723846039e-08;
  if (x != x) return x;
  if (x > 7.09782712893383973096e+02) return kInf;
  if (x < -7.45133219101941108420e+02) return 0.0;
  const double ax = x < 0 ? -x : x;
  if (ax < 3.7252902984e-09) return 1.0 + x;  // |x| < 2^-28
  int k = 0;
  double hi = x, lo = 0.0;
  if (ax > 0.5 * kLn2Hi) {
    k = int(kInvLn2 * x + (x < 0 ? -0.5 : 0.5));
    const double t = double(k);
    hi = x - t * kLn2Hi;
    lo = t * kLn2Lo;
    x = hi - lo;
  }
  const double t = x * x;
  const double c = x - t * (P1 + t * (P2 + t * (P3 + t * (P4 + t * P5))));
  if (k == 0) return 1.0 - ((x * c) / (c - 2.0) - x);
  const double y = 1.0 - ((lo - (x * c) / (2.0 - c)) - hi);
  if (k > 1023) return y * two_to(1023) * two_to(k - 1023);
  if (k >= -1021) return y * two_to(k);
  return y * two_to(k + 1000) * two_to(-1000);
}

// ============================================================================ log
double log(double x) {
  constexpr double Lg1 = 6.666666666666735130e-01, Lg2 = 3.999999999940941908e-01, Lg3 = 2.857142874366239149e-01,
                   Lg4 = 2.222219843214978396e-01, Lg5 = 1.818357216161805012e-01, Lg6 = 1.531383769920937332e-01,
                   Lg7 = 1.479819860511658591e-01;
  if (x != x) return x;
  if (x < 0) return kNaN;
  if (x == 0) return -kInf;
  if (x == kInf) return x;
  int k = 0;
  uint64_t b = bits_of(x);
  if ((b >> 52) == 0) {  // subnormal: scale by 2^54
    x *= 1.80143985094819840000e+16;
    k -= 54;
    b = bits_of(x);
  }
  int32_t hx = int32_t(b >> 32);
  k += (hx >> 20) - 1023;
  hx &= 0x000fffff;
  const int32_t i0 = (hx + 0x95f64) & 0x100000;
  b = (uint64_t(uint32_t(hx | (i0 ^ 0x3ff00000))) << 32) | (b & 0xffffffffULL);  // x or x/2 in [sqrt(1/2), sqrt(2))
  x = from_bits(b);
  k += i0 >> 20;
  const double f = x - 1.0;
  const double dk = double(k);
  if ((0x000fffff & (2 + hx)) < 3) {  // |f| < 2^-20
    if (f == 0.0) return k == 0 ? 0.0 : dk * kLn2Hi + dk * kLn2Lo;
    const double R = f * f * (0.5 - 0.33333333333333333 * f);
    return k == 0 ? f - R : dk * kLn2Hi - ((R - dk * kLn2Lo) - f);
  }
  const double s = f / (2.0 + f), z = s * s, w = z * z;
  int32_t i = hx - 0x6147a;
  const int32_t j = 0x6b851 - hx;
  const double t1 = w * (Lg2 + w * (Lg4 + w * Lg6));
  const double t2 = z * (Lg1 + w * (Lg3 + w * (Lg5 + w * Lg7)));
  i |= j;
  const double R = t2 + t1;
  if (i > 0) {
    const double hfsq = 0.5 * f * f;
    return k == 0 ? f - (hfsq - s * (hfsq + R)) : dk * kLn2Hi - ((hfsq - (s * (hfsq + R) + dk * kLn2Lo)) - f);
  }
  return k == 0 ? f - s * (f - R) : dk * kLn2Hi - ((s * (f - R) - dk * kLn2Lo) - f);
}

double log1p(double u) {
  if (u != u) return u;
  if (u < -1.0) return kNaN;
  if (u == -1.0) return -kInf;
  const double au = u < 0 ? -u : u;
  if (au < 5.551115123125783e-17) return u;  // |u| < 2^-54
  const double x = 1.0 + u;
  if (x == kInf) return x;
  return log(x) + (u - (x - 1.0)) / x;  // the rounding of 1 + u, put back to first order
}

double pow(double x, double y) {
  if (x != x || y != y || x < 0) return kNaN;
  if (y == 0.0 || x == 1.0) return 1.0;
  if (x == 0.0) return y > 0 ? 0.0 : kInf;
  return exp(y * log(x));
}

// ============================================================================ sin, cos
double sin(double x) {
  if (!(x - x == 0.0)) return kNaN;  // NaN or infinite
  const double ax = x < 0 ? -x : x;
  if (ax < 7.450580596923828e-09) return x;  // |x| < 2^-27
  if (ax <= 0.7853981633974483) return kernel_sin(x, 0.0);
  double y0, y1;
  const int64_t n = reduce_half_pi(x, &y0, &y1);
  switch (n & 3) {
    case 0: return kernel_sin(y0, y1);
    case 1: return kernel_cos(y0, y1);
    case 2: return -kernel_sin(y0, y1);
    default: return -kernel_cos(y0, y1);
  }
}

double cos(double x) {
  if (!(x - x == 0.0)) return kNaN;
  const double ax = x < 0 ? -x : x;
  if (ax < 7.450580596923828e-09) return 1.0;
  if (ax <= 0.7853981633974483) return kernel_cos(x, 0.0);
  double y0, y1;
  const int64_t n = reduce_half_pi(x, &y0, &y1);
  switch (n & 3) {
    case 0: return kernel_cos(y0, y1);
    case 1: return -kernel_sin(y0, y1);
    case 2: return -kernel_cos(y0, y1);
    default: return kernel_sin(y0, y1);
  }
}

// ============================================================================ atan, atan2
double atan(double x) {
  constexpr double atanhi[] = {4.63647609000806093515e-01, 7.85398163397448278999e-01, 9.82793723247329054082e-01,
                               1.57079632679489655800e+00};
  constexpr double atanlo[] = {2.26987774529616870924e-17, 3.06161699786838301793e-17, 1.39033110312309984516e-17,
                               6.12323399573676603587e-17};
  constexpr double aT[] = {3.33333333333329318027e-01,  -1.99999999998764832476e-01, 1.42857142725034663711e-01,
                           -1.11111104054623557880e-01, 9.09088713343650656196e-02,  -7.69187620504482999495e-02,
                           6.66107313738753120669e-02,  -5.83357013379057348645e-02, 4.97687799461593236017e-02,
                           -3.65315727442169155270e-02, 1.62858201153657823623e-02};
  if (x != x) return x;
  const bool negative = x < 0;
  const uint32_t ix = high_word(x) & 0x7fffffff;
  if (ix >= 0x44100000) return negative ? -atanhi[3] - atanlo[3] : atanhi[3] + atanlo[3];  // |x| >= 2^66
  int id;
  if (ix < 0x3fdc0000) {                  // |x| < 0.4375
    if (ix < 0x3e400000) return x;        // |x| < 2^-27
    id = -1;
  } else {
    x = negative ? -x : x;
    if (ix < 0x3ff30000) {                // |x| < 1.1875
      if (ix < 0x3fe60000) {              // 7/16 <= |x| < 11/16
        id = 0;
        x = (2.0 * x - 1.0) / (2.0 + x);
      } else {                            // 11/16 <= |x| < 19/16
        id = 1;
        x = (x - 1.0) / (x + 1.0);
      }
    } else if (ix < 0x40038000) {         // |x| < 2.4375
      id = 2;
      x = (x - 1.5) / (1.0 + 1.5 * x);
    } else {                              // 2.4375 <= |x| < 2^66
      id = 3;
      x = -1.0 / x;
    }
  }
  const double z = x * x, w = z * z;
  const double s1 = z * (aT[0] + w * (aT[2] + w * (aT[4] + w * (aT[6] + w * (aT[8] + w * aT[10])))));
  const double s2 = w * (aT[1] + w * (aT[3] + w * (aT[5] + w * (aT[7] + w * aT[9]))));
  if (id < 0) return x - x * (s1 + s2);
  const double r = atanhi[id] - ((x * (s1 + s2) - atanlo[id]) - x);
  return negative ? -r : r;
}

double atan2(double y, double x) {
  if (x != x || y != y) return kNaN;
  const bool y_negative = std::signbit(y), x_negative = std::signbit(x);
  const double ay = y_negative ? -y : y, ax = x_negative ? -x : x;
  double z;
  if (ay == 0.0) {
    z = 0.0;
  } else if (ax == 0.0) {
    z = kPiOver2;
  } else if (ax == kInf && ay == kInf) {
    z = 0.7853981633974483;
  } else {
    z = atan(ay / ax);
  }
  if (x_negative) z = kPiHi - (z - kPiLo);
  return y_negative ? -z : z;
}

// ============================================================================ cbrt, hypot
double cbrt(double x) {
  if (x != x || x == 0.0 || x == kInf || x == -kInf) return x;
  const bool negative = x < 0;
  double a = negative ? -x : x;
  double back = 1.0;
  if ((bits_of(a) >> 52) == 0) {  // subnormal: cbrt(a 2^54) = cbrt(a) 2^18
    a *= 1.80143985094819840000e+16;
    back = 1.0 / 262144.0;
  }
  // Seed: the exponent divided by three (error below 10 %), then Newton t <- t - (t^3 - a) / (3 t^2).
  const uint32_t hx = high_word(a);
  double t = from_bits(uint64_t(hx / 3 + 715094163u) << 32);
  for (int step = 0; step < 3; ++step) t = t - (t * t * t - a) / (3.0 * t * t);
  // Rounded away from zero to 23 bits, so t * t is exact; then one step of the form that loses
  // least: t + t (a / t^2 - t) / (2 t + a / t^2).
  t = from_bits((bits_of(t) + 0x80000000ULL) & 0xffffffffc0000000ULL);
  const double r = a / (t * t);
  t = t + t * ((r - t) / (t + t + r));
  t *= back;
  return negative ? -t : t;
}

double hypot(double a, double b) {
  a = a < 0 ? -a : a;
  b = b < 0 ? -b : b;
  if (a == kInf || b == kInf) return kInf;
  if (a != a || b != b) return kNaN;
  const double big = a > b ? a : b;
  if (big == 0.0) return 0.0;
  if (big > 1e150) return two_to(600) * std::sqrt((a * two_to(-600)) * (a * two_to(-600)) + (b * two_to(-600)) * (b * two_to(-600)));
  if (big < 1e-150) return two_to(-600) * std::sqrt((a * two_to(600)) * (a * two_to(600)) + (b * two_to(600)) * (b * two_to(600)));
  return std::sqrt(a * a + b * b);
}

}  // namespace kith::pm
