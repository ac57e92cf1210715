// Formulas and sources: see colour.h.
#include "solver/features/colour.h"

#include <algorithm>
#include <cmath>

#include "solver/base/portable_math.h"


namespace kith {
namespace {

constexpr double kPi = 3.14159265358979323846;
constexpr double kDeg = kPi / 180.0;

// IEC 61966-2-1 matrix, linear sRGB -> XYZ.
constexpr double kM[3][3] = {{0.4124, 0.3576, 0.1805}, {0.2126, 0.7152, 0.0722}, {0.0193, 0.1192, 0.9505}};
constexpr double kWhiteX = 0.4124 + 0.3576 + 0.1805;  // 0.9505
constexpr double kWhiteY = 1.0;
constexpr double kWhiteZ = 0.0193 + 0.1192 + 0.9505;  // 1.0890

constexpr double kDelta = 6.0 / 29.0;

// x^7 by products in a fixed order (libm's pow differs between its builds in the last bit).
inline double seventh_power(double x) {
  const double x2 = x * x, x4 = x2 * x2;
  return x4 * x2 * x;
}

double lab_f(double t) {
  return t > kDelta * kDelta * kDelta ? pm::cbrt(t) : t / (3.0 * kDelta * kDelta) + 4.0 / 29.0;
}
double lab_f_inverse(double f) { return f > kDelta ? f * f * f : 3.0 * kDelta * kDelta * (f - 4.0 / 29.0); }

// Inverse of kM, computed once (3 x 3 by cofactors).
struct Inverse {
  double m[3][3];
  Inverse() {
    const auto& a = kM;
    const double det = a[0][0] * (a[1][1] * a[2][2] - a[1][2] * a[2][1]) -
                       a[0][1] * (a[1][0] * a[2][2] - a[1][2] * a[2][0]) +
                       a[0][2] * (a[1][0] * a[2][1] - a[1][1] * a[2][0]);
    m[0][0] = (a[1][1] * a[2][2] - a[1][2] * a[2][1]) / det;
    m[0][1] = (a[0][2] * a[2][1] - a[0][1] * a[2][2]) / det;
    m[0][2] = (a[0][1] * a[1][2] - a[0][2] * a[1][1]) / det;
    m[1][0] = (a[1][2] * a[2][0] - a[1][0] * a[2][2]) / det;
    m[1][1] = (a[0][0] * a[2][2] - a[0][2] * a[2][0]) / det;
    m[1][2] = (a[0][2] * a[1][0] - a[0][0] * a[1][2]) / det;
    m[2][0] = (a[1][0] * a[2][1] - a[1][1] * a[2][0]) / det;
    m[2][1] = (a[0][1] * a[2][0] - a[0][0] * a[2][1]) / det;
    m[2][2] = (a[0][0] * a[1][1] - a[0][1] * a[1][0]) / det;
  }
};
const Inverse& inverse() {
  static const Inverse inv;
  return inv;
}

}  // namespace

Xyz d65_white() { return {kWhiteX, kWhiteY, kWhiteZ}; }

double srgb_decode(double c) { return c <= 0.04045 ? c / 12.92 : pm::pow((c + 0.055) / 1.055, 2.4); }

double srgb_encode(double v) { return v <= 0.0031308 ? 12.92 * v : 1.055 * pm::pow(v, 1.0 / 2.4) - 0.055; }

Xyz linear_rgb_to_xyz(double r, double g, double b) {
  return {kM[0][0] * r + kM[0][1] * g + kM[0][2] * b, kM[1][0] * r + kM[1][1] * g + kM[1][2] * b,
          kM[2][0] * r + kM[2][1] * g + kM[2][2] * b};
}

void xyz_to_linear_rgb(const Xyz& c, double* r, double* g, double* b) {
  const auto& m = inverse().m;
  *r = m[0][0] * c.X + m[0][1] * c.Y + m[0][2] * c.Z;
  *g = m[1][0] * c.X + m[1][1] * c.Y + m[1][2] * c.Z;
  *b = m[2][0] * c.X + m[2][1] * c.Y + m[2][2] * c.Z;
}

Lab xyz_to_lab(const Xyz& c) {
  const double fx = lab_f(c.X / kWhiteX), fy = lab_f(c.Y / kWhiteY), fz = lab_f(c.Z / kWhiteZ);
  return {116.0 * fy - 16.0, 500.0 * (fx - fy), 200.0 * (fy - fz)};
}

Xyz lab_to_xyz(const Lab& lab) {
  const double fy = (lab.L + 16.0) / 116.0;
  const double fx = fy + lab.a / 500.0;
  const double fz = fy - lab.b / 200.0;
  return {kWhiteX * lab_f_inverse(fx), kWhiteY * lab_f_inverse(fy), kWhiteZ * lab_f_inverse(fz)};
}

Lab srgb_to_lab(double r, double g, double b) {
  return xyz_to_lab(linear_rgb_to_xyz(srgb_decode(r), srgb_decode(g), srgb_decode(b)));
}

void lab_to_srgb(const Lab& lab, double* r, double* g, double* b, bool* in_gamut) {
  double lin[3];
  xyz_to_linear_rgb(lab_to_xyz(lab), &lin[0], &lin[1], &lin[2]);
  bool ok = true;
  double* out[3] = {r, g, b};
  for (int k = 0; k < 3; ++k) {
    if (lin[k] < -1e-9 || lin[k] > 1.0 + 1e-9) ok = false;
    *out[k] = srgb_encode(std::clamp(lin[k], 0.0, 1.0));
  }
  if (in_gamut) *in_gamut = ok;
}

double ciede2000(const Lab& x, const Lab& y, const Ciede2000Weights& w) {
  const double c1 = pm::hypot(x.a, x.b), c2 = pm::hypot(y.a, y.b);
  const double cbar = 0.5 * (c1 + c2);
  const double cbar7 = seventh_power(cbar);
  const double p25_7 = 6103515625.0;  // 25^7
  const double g = 0.5 * (1.0 - std::sqrt(cbar7 / (cbar7 + p25_7)));
  const double a1 = (1.0 + g) * x.a, a2 = (1.0 + g) * y.a;
  const double cp1 = pm::hypot(a1, x.b), cp2 = pm::hypot(a2, y.b);
  auto hue = [](double b, double a) {
    if (a == 0.0 && b == 0.0) return 0.0;
    double h = pm::atan2(b, a) / kDeg;
    return h < 0.0 ? h + 360.0 : h;
  };
  const double hp1 = hue(x.b, a1), hp2 = hue(y.b, a2);

  const double dl = y.L - x.L;
  const double dc = cp2 - cp1;
  double dh = 0.0;
  if (cp1 * cp2 != 0.0) {
    dh = hp2 - hp1;
    if (dh > 180.0) dh -= 360.0;
    else if (dh < -180.0) dh += 360.0;
  }
  const double dH = 2.0 * std::sqrt(cp1 * cp2) * pm::sin(0.5 * dh * kDeg);

  const double lbar = 0.5 * (x.L + y.L);
  const double cpbar = 0.5 * (cp1 + cp2);
  double hbar = hp1 + hp2;
  if (cp1 * cp2 != 0.0) {
    if (std::abs(hp1 - hp2) <= 180.0) hbar = 0.5 * (hp1 + hp2);
    else if (hp1 + hp2 < 360.0) hbar = 0.5 * (hp1 + hp2 + 360.0);
    else hbar = 0.5 * (hp1 + hp2 - 360.0);
  }
  const double t = 1.0 - 0.17 * pm::cos((hbar - 30.0) * kDeg) + 0.24 * pm::cos(2.0 * hbar * kDeg) +
                   0.32 * pm::cos((3.0 * hbar + 6.0) * kDeg) - 0.20 * pm::cos((4.0 * hbar - 63.0) * kDeg);
  const double dtheta = 30.0 * pm::exp(-((hbar - 275.0) / 25.0) * ((hbar - 275.0) / 25.0));
  const double cpbar7 = seventh_power(cpbar);
  const double rc = 2.0 * std::sqrt(cpbar7 / (cpbar7 + p25_7));
  const double l50 = (lbar - 50.0) * (lbar - 50.0);
  const double sl = 1.0 + 0.015 * l50 / std::sqrt(20.0 + l50);
  const double sc = 1.0 + 0.045 * cpbar;
  const double sh = 1.0 + 0.015 * cpbar * t;
  const double rt = -pm::sin(2.0 * dtheta * kDeg) * rc;

  const double tl = dl / (w.kL * sl), tc = dc / (w.kC * sc), th = dH / (w.kH * sh);
  return std::sqrt(std::max(0.0, tl * tl + tc * tc + th * th + rt * tc * th));
}

}  // namespace kith
