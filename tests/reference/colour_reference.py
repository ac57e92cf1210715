"""Outside reference for kith's colour checks (tests/test_demo_colour.cpp), using scikit-image.

  colour_reference.py rgb2lab N SEED     N random sRGB colours: r g b  L a b (standard's constants)  L a b (stock)
  colour_reference.py ciede2000 N SEED   N random CIELAB pairs: L1 a1 b1 L2 a2 b2 dE00

scikit-image's rgb2lab uses a 6-digit sRGB matrix and the white (0.95047, 1, 1.08883); kith uses
the 4-digit matrix and white printed in IEC 61966-2-1 itself. The first Lab triple is computed by
scikit-image's own code with the standard's constants put in its module tables (so it checks
kith's arithmetic: decoding curve, matrix product, CIELAB f); the second is stock scikit-image.
"""
import sys

import numpy as np
from skimage.color import colorconv, deltaE_ciede2000, rgb2lab


def main():
    mode, n, seed = sys.argv[1], int(sys.argv[2]), int(sys.argv[3])
    rng = np.random.default_rng(seed)
    if mode == "rgb2lab":
        rgb = rng.random((n, 3))
        rgb[:8] = [[0, 0, 0], [1, 1, 1], [1, 0, 0], [0, 1, 0], [0, 0, 1], [0.5, 0.5, 0.5], [0.01, 0.02, 0.03],
                   [0.04, 0.04045, 0.05]][: min(8, n)]
        stock = rgb2lab(rgb[None])[0]
        colorconv.xyz_from_rgb[:] = [[0.4124, 0.3576, 0.1805], [0.2126, 0.7152, 0.0722], [0.0193, 0.1192, 0.9505]]
        colorconv.illuminants["D65"]["2"] = (0.9505, 1.0, 1.0890)
        standard = rgb2lab(rgb[None])[0]
        for c, s, k in zip(rgb, standard, stock):
            print(" ".join(repr(float(v)) for v in (*c, *s, *k)))
    elif mode == "ciede2000":
        lab1 = np.column_stack([rng.uniform(0, 100, n), rng.uniform(-110, 110, n), rng.uniform(-110, 110, n)])
        # half the pairs close together, where the hue terms matter most
        lab2 = lab1 + rng.normal(0, 8, (n, 3))
        far = rng.random(n) < 0.5
        lab2[far] = np.column_stack([rng.uniform(0, 100, n), rng.uniform(-110, 110, n),
                                     rng.uniform(-110, 110, n)])[far]
        de = deltaE_ciede2000(lab1, lab2)
        for x, y, d in zip(lab1, lab2, de):
            print(" ".join(repr(float(v)) for v in (*x, *y, d)))
    else:
        sys.exit("unknown mode " + mode)


if __name__ == "__main__":
    main()
