// Colour: sRGB <-> CIE XYZ (D65) <-> CIELAB, and the CIEDE2000 colour difference.
//
// sRGB (IEC 61966-2-1:1999), components in [0, 1]:
//   decode   c_lin = c / 12.92                    if c <= 0.04045
//                  = ((c + 0.055) / 1.055)^2.4    otherwise
//   to XYZ   [X Y Z] = M [R G B]_lin with the standard's matrix
//              M = [0.4124 0.3576 0.1805; 0.2126 0.7152 0.0722; 0.0193 0.1192 0.9505]
//            and the standard's D65 reference white Xn, Yn, Zn = 0.9505, 1.0000, 1.0890 (the row
//            sums of M, so R = G = B gives a* = b* = 0 exactly). Y is scaled so white is 1.
// CIELAB (CIE 15:2004, section 8.2.1):
//   L* = 116 f(Y/Yn) - 16,  a* = 500 (f(X/Xn) - f(Y/Yn)),  b* = 200 (f(Y/Yn) - f(Z/Zn))
//   f(t) = t^(1/3) if t > (6/29)^3, else t / (3 (6/29)^2) + 4/29.
// CIEDE2000 (CIE 142-2001), following the implementation notes of Sharma, Wu & Dalal (2005),
// with kL = kC = kH = 1 by default:
//   C = sqrt(a^2+b^2), G = 0.5 (1 - sqrt(Cbar^7 / (Cbar^7 + 25^7))), a' = (1 + G) a,
//   C' = sqrt(a'^2 + b^2), h' = atan2(b, a') in [0, 360),
//   dL' = L2 - L1, dC' = C2' - C1', dH' = 2 sqrt(C1' C2') sin(dh'/2),
//   T = 1 - 0.17 cos(hbar' - 30) + 0.24 cos(2 hbar') + 0.32 cos(3 hbar' + 6) - 0.20 cos(4 hbar' - 63),
//   SL = 1 + 0.015 (Lbar' - 50)^2 / sqrt(20 + (Lbar' - 50)^2), SC = 1 + 0.045 Cbar', SH = 1 + 0.015 Cbar' T,
//   RT = -sin(2 dtheta) RC, dtheta = 30 exp(-((hbar' - 275) / 25)^2), RC = 2 sqrt(Cbar'^7 / (Cbar'^7 + 25^7)),
//   dE00 = sqrt((dL'/kL SL)^2 + (dC'/kC SC)^2 + (dH'/kH SH)^2 + RT (dC'/kC SC)(dH'/kH SH)).
// Pure functions; any thread.
#pragma once

namespace kith {

struct Lab {
  double L = 0.0, a = 0.0, b = 0.0;
};
struct Xyz {
  double X = 0.0, Y = 0.0, Z = 0.0;
};

// The reference white used throughout (IEC 61966-2-1's D65, Y = 1).
Xyz d65_white();

// One sRGB component in [0, 1] to linear light and back.
double srgb_decode(double c);
double srgb_encode(double linear);

Xyz linear_rgb_to_xyz(double r, double g, double b);
void xyz_to_linear_rgb(const Xyz& xyz, double* r, double* g, double* b);
Lab xyz_to_lab(const Xyz& xyz);
Xyz lab_to_xyz(const Lab& lab);

// Convenience: sRGB components in [0, 1] (not linear) to CIELAB and back. lab_to_srgb clamps to
// [0, 1]; `in_gamut` (optional) says whether clamping was needed (beyond 1e-9).
Lab srgb_to_lab(double r, double g, double b);
void lab_to_srgb(const Lab& lab, double* r, double* g, double* b, bool* in_gamut = nullptr);

struct Ciede2000Weights {
  double kL = 1.0;  // lightness (default: 1)
  double kC = 1.0;  // chroma (default: 1)
  double kH = 1.0;  // hue (default: 1)
};

// CIEDE2000 colour difference between two CIELAB colours (symmetric, >= 0).
double ciede2000(const Lab& x, const Lab& y, const Ciede2000Weights& weights = {});

}  // namespace kith
