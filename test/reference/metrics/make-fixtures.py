#!/usr/bin/python3
"""Reference values for Veil's image metrics (app/metrics), made with scikit-image and SciPy.

Run from the repository root with Debian's python3 (python3-skimage, python3-scipy, python3-numpy):
    /usr/bin/python3 test/reference/metrics/make-fixtures.py
Writes the invented volumes test/reference/metrics/*.npy and expected.json. The Vitest tests
(test/unit/metrics-images.test.ts) read those files, so CI needs neither Python nor these packages.

Every volume is an invented synthetic phantom (ellipses, ramps, sinusoids, seeded noise).

For each case expected.json holds two sets of values:
- "veil": computed on the pixels exactly as Veil holds them (its Volume model stores 32-bit floats;
  complex values become their magnitude), cast to float64 before calling the reference functions,
  so that the reference arithmetic is double precision. Veil must agree to rounding (tests: 1e-12).
- "native": computed the way a user would call scikit-image on the file's own dtype (complex as
  np.abs in the file's precision). Veil must agree to 1e-6 (the float32 storage of float64 and
  complex128 pixels is the only difference besides rounding).

Reference functions (scikit-image and SciPy versions are recorded in "generator"):
- PSNR: skimage.metrics.peak_signal_noise_ratio(ref, test, data_range=L)
- SSIM: skimage.metrics.structural_similarity(ref[s], test[s], gaussian_weights=True,
  use_sample_covariance=False, data_range=L) for each 2D slice s, averaged over slices
- NRMSE: skimage.metrics.normalized_root_mse(ref, test, normalization='euclidean')
- HFEN: Ravishankar & Bresler (2011): ||LoG(ref) - LoG(test)|| / ||LoG(ref)|| over all slices, with
  LoG = scipy.ndimage.gaussian_laplace(slice, sigma=1.5, mode='reflect', truncate=7/1.5) per slice
  (radius 7: the paper's 15x15 filter; checked below on an impulse)
- L = max(ref) - min(ref) over the whole volume
- automatic mask: skimage.filters.threshold_otsu(ref) (256 bins), ref > threshold, then the largest
  component of scipy.ndimage.label (default, face-connected structure), then
  scipy.ndimage.binary_fill_holes on each 2D slice (default structure); written as <case>-automask.npy
- masked values: the same formulas over mask voxels (NumPy), SSIM from structural_similarity(...,
  full=True) maps: the mean over mask pixels of each slice's interior (5 pixels from the edges), then
  over the slices that have any.
"""
import json
import os
import platform

import numpy as np
import scipy
import skimage
from scipy import ndimage
from skimage.filters import threshold_otsu
from skimage.metrics import normalized_root_mse, peak_signal_noise_ratio, structural_similarity

OUT = os.path.join("test", "reference", "metrics")
GENERATOR = "Python %s, scikit-image %s, SciPy %s, NumPy %s" % (
    platform.python_version(), skimage.__version__, scipy.__version__, np.__version__)
HFEN_TRUNCATE = 7 / 1.5
PAD = 5  # SSIM interior: (11 - 1) / 2

rng = np.random.default_rng(20240611)


def ellipse(rows, cols, cy, cx, ry, rx):
    y, x = np.mgrid[0:rows, 0:cols]
    return ((y - cy) / ry) ** 2 + ((x - cx) / rx) ** 2 <= 1


def phantom(slices, rows, cols, scale=100.0):
    """Invented head-like phantom: an outer ellipse, two inner ellipses, a ramp, varying by slice."""
    vol = np.zeros((slices, rows, cols))
    for s in range(slices):
        img = 0.8 * ellipse(rows, cols, rows / 2, cols / 2, rows * 0.4, cols * 0.42)
        img += 0.5 * ellipse(rows, cols, rows * 0.4, cols * 0.4, rows * 0.12 + s, cols * 0.1)
        img -= 0.3 * ellipse(rows, cols, rows * 0.6, cols * 0.62, rows * 0.1, cols * 0.12 + s)
        ramp = np.linspace(0.9, 1.1, cols)[None, :]
        vol[s] = img * ramp
    return vol * scale


def noisy_magnitude(vol, sigma):
    """Magnitude of the volume plus complex Gaussian noise (Rician background, as MR magnitude images have)."""
    return np.abs(vol + sigma * (rng.standard_normal(vol.shape) + 1j * rng.standard_normal(vol.shape)))


def blur(vol, sigma):
    return np.stack([ndimage.gaussian_filter(s, sigma) for s in vol])


def log_slices(vol):
    return np.stack([ndimage.gaussian_laplace(s, sigma=1.5, mode="reflect", truncate=HFEN_TRUNCATE) for s in vol])


def check_log_support():
    impulse = np.zeros((31, 31))
    impulse[15, 15] = 1
    out = ndimage.gaussian_laplace(impulse, sigma=1.5, mode="reflect", truncate=HFEN_TRUNCATE)
    nz = np.argwhere(out != 0)
    assert nz.min(axis=0).tolist() == [8, 8] and nz.max(axis=0).tolist() == [22, 22], "LoG support is not 15x15"


def largest_component(binary):
    labels, count = ndimage.label(binary)
    if count == 0:
        return np.zeros_like(binary, dtype=np.uint8), 0
    sizes = np.bincount(labels.ravel())[1:]
    return (labels == (np.argmax(sizes) + 1)).astype(np.uint8), int(count)


def fill_holes_by_slice(mask):
    filled = np.stack([ndimage.binary_fill_holes(s) for s in mask]).astype(np.uint8)
    return filled, int(filled.sum() - mask.sum())


def metrics(ref, test, L, mask=None):
    """The four metrics of test against ref (float arrays of any float dtype), as the docstring says."""
    slices = ref.shape[0]
    maps = [structural_similarity(ref[s], test[s], gaussian_weights=True, use_sample_covariance=False,
                                  data_range=L, full=True) for s in range(slices)]
    out = {
        "psnr": float(peak_signal_noise_ratio(ref, test, data_range=L)),
        "ssim": float(np.mean([m[0] for m in maps])),
        "ssim_per_slice": [float(m[0]) for m in maps],
        "nrmse": float(normalized_root_mse(ref, test, normalization="euclidean")),
    }
    lr = log_slices(ref.astype(np.float64))
    lt = log_slices(test.astype(np.float64))
    out["hfen"] = float(np.linalg.norm(lr - lt) / np.linalg.norm(lr))
    if mask is not None:
        m = mask.astype(bool)
        r64, t64 = ref.astype(np.float64), test.astype(np.float64)
        slice_means = []
        for s in range(slices):
            ms = m[s, PAD:-PAD, PAD:-PAD]
            if ms.any():
                slice_means.append(maps[s][1][PAD:-PAD, PAD:-PAD][ms].astype(np.float64).mean())
        out["masked"] = {
            "psnr": float(10 * np.log10(L * L / np.mean((r64[m] - t64[m]) ** 2))),
            "ssim": float(np.mean(slice_means)) if slice_means else None,
            "ssim_slices": len(slice_means),
            "nrmse": float(np.linalg.norm(r64[m] - t64[m]) / np.linalg.norm(r64[m])),
            "hfen": float(np.linalg.norm(lr[m] - lt[m]) / np.linalg.norm(lr[m])),
            "voxels": int(m.sum()),
        }
    return out


def as_veil(a):
    """The pixels as Veil's Volume holds them: float32 (complex: magnitude), then float64 for the arithmetic."""
    if np.iscomplexobj(a):
        a = np.abs(a.astype(np.complex128))
    return a.astype(np.float32).astype(np.float64)


def as_native(a):
    return np.abs(a) if np.iscomplexobj(a) else a


def make_case(name, ref, test, automask=False, mask_file=None):
    np.save(os.path.join(OUT, f"{name}-ref.npy"), ref)
    np.save(os.path.join(OUT, f"{name}-test.npy"), test)
    case = {"name": name, "dtype": str(ref.dtype), "shape": list(ref.shape),
            "reference": f"{name}-ref.npy", "test": f"{name}-test.npy"}

    rv, tv = as_veil(ref), as_veil(test)
    if rv.ndim == 2:
        rv, tv = rv[None], tv[None]
    Lv = float(rv.max() - rv.min())
    case["veil"] = {"data_range": Lv, **metrics(rv, tv, Lv)}

    rn, tn = as_native(ref), as_native(test)
    if rn.ndim == 2:
        rn, tn = rn[None], tn[None]
    Ln = float(rn.max() - rn.min())
    case["native"] = {"data_range": Ln, **metrics(rn, tn, Ln)}

    if automask:
        threshold = float(threshold_otsu(rv))
        mask, components = largest_component(rv > threshold)
        mask, filled = fill_holes_by_slice(mask)
        np.save(os.path.join(OUT, f"{name}-automask.npy"), mask)
        case["automask"] = {"file": f"{name}-automask.npy", "threshold": threshold, "components": components, "filled": filled,
                            **metrics(rv, tv, Lv, mask)["masked"]}
    if mask_file is not None:
        np.save(os.path.join(OUT, f"{name}-mask.npy"), mask_file)
        case["filemask"] = {"file": f"{name}-mask.npy", **metrics(rv, tv, Lv, mask_file)["masked"]}
    return case


def main():
    check_log_support()
    cases = []

    # float32, 3 slices of 24 x 28: blurred and noisy test; automatic mask and a mask file.
    ref = noisy_magnitude(phantom(3, 24, 28), 2.0).astype(np.float32)
    ref[1, 2, 2] = 90  # a bright speck in the background: a component the largest-component rule drops
    ref[:, 10:13, 12:16] = 1.0  # a dark region inside the body: a hole the mask fills
    test = (blur(ref.astype(np.float64), 0.8) + rng.normal(0, 3, ref.shape)).astype(np.float32)
    box = np.zeros(ref.shape, dtype=np.uint8)
    box[:, 6:18, 4:20] = 1
    box[2] = 0  # a slice without mask pixels: the masked SSIM averages over the others
    cases.append(make_case("f32", ref, test, automask=True, mask_file=box))

    # float64, 2 slices of 20 x 32: fine sinusoidal texture, test shifted by a fraction of a pixel and noisy.
    y, x = np.mgrid[0:20, 0:32]
    tex = np.stack([np.sin(x / (2.0 + s)) * np.cos(y / 3.0) + 0.001 * (x + y) for s in range(2)])
    ref = tex + 2.0
    test = np.stack([ndimage.shift(s, (0.3, -0.4), mode="nearest") for s in ref]) + rng.normal(0, 0.05, ref.shape)
    cases.append(make_case("f64", ref.astype(np.float64), test.astype(np.float64)))

    # int16, 4 slices of 16 x 16 on a scanner-like scale, with a negative offset in the test.
    ref = np.round(noisy_magnitude(phantom(4, 16, 16, scale=2000.0), 40.0)).astype(np.int16)
    ref[3, 0:2, 14:16] = 1900  # a second component in the background corner
    test = np.round(blur(ref.astype(np.float64), 1.0) - 15 + rng.normal(0, 50, ref.shape)).astype(np.int16)
    cases.append(make_case("i16", ref, test, automask=True))

    # complex64, 2 slices of 18 x 22 with a phase ramp; compared as magnitudes.
    mag = phantom(2, 18, 22, scale=10.0) + 0.5
    phase = np.exp(1j * np.linspace(0, np.pi, 22))[None, None, :]
    ref = (mag * phase).astype(np.complex64)
    test = (mag * phase * 0.97 + 0.4 * (rng.standard_normal(mag.shape) + 1j * rng.standard_normal(mag.shape))).astype(np.complex64)
    cases.append(make_case("c64", ref, test))

    # complex128, a single 2D slice of 12 x 11 (one slice; just above SSIM's 11 x 11 minimum; the
    # HFEN filter of radius 7 reflects twice at these borders).
    mag = phantom(1, 12, 11, scale=3.0)[0] + 1.0
    ref = mag * np.exp(1j * 0.3)
    test = ref + 0.2 * (rng.standard_normal(mag.shape) + 1j * rng.standard_normal(mag.shape))
    cases.append(make_case("c128", ref.astype(np.complex128), test.astype(np.complex128)))

    with open(os.path.join(OUT, "expected.json"), "w") as f:
        json.dump({"generator": GENERATOR, "cases": cases}, f, indent=1)
        f.write("\n")


if __name__ == "__main__":
    main()
