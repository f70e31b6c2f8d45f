"""Writes tests/fixtures/homography.json: image-to-ground homographies from OpenCV.

Reference: cv2.findHomography(src, dst, method=0) from the opencv-python-headless wheel (version
recorded in the fixture): the least-squares fit over all points. Each case lists the point pairs,
OpenCV's matrix (scaled so h22 = 1) and where it maps a few probe points.
Run from the repository root:  python3 tests/reference/make_homography_fixtures.py
"""
import json
import pathlib

import cv2
import numpy as np

rng = np.random.default_rng(31)


def project(h, pts):
    p = np.hstack([pts, np.ones((len(pts), 1))]) @ h.T
    return p[:, :2] / p[:, 2:3]


def case(name, ground_to_image, ground, noise):
    ground = np.asarray(ground, dtype=float)
    image = project(ground_to_image, ground) + rng.normal(scale=noise, size=(len(ground), 2))
    h, _ = cv2.findHomography(image.astype(np.float64), ground.astype(np.float64), method=0)
    h = h / h[2, 2]
    probes = np.array([[320.0, 300.0], [100.0, 340.0], [500.0, 150.0], [250.0, 200.0]])
    return {
        "name": name,
        "noise_px": noise,
        "pairs": [{"image": [float(a), float(b)], "ground": [float(c), float(d)]} for (a, b), (c, d) in zip(image, ground)],
        "h": [float(v) for v in h.ravel()],
        "probes": probes.tolist(),
        "probes_ground": project(h, probes).tolist(),
    }


# A camera looking down a plaza: ground metres (x across, y away from the camera) to pixels.
camera = np.array([[40.0, 0.0, 320.0], [0.0, -25.0, 350.0], [0.0, 0.06, 1.0]])
square = [[-4, 2], [4, 2], [4, 12], [-4, 12]]
six = square + [[0, 5], [-2, 9]]
grid = [[x, y] for x in (-5, 0, 5) for y in (2, 7, 14)]
cases = [
    case("four corners, exact", camera, square, 0.0),
    case("six points, exact", camera, six, 0.0),
    case("nine points, half-pixel noise", camera, grid, 0.5),
]
out = {
    "source": f"opencv-python-headless {cv2.__version__} cv2.findHomography(method=0), numpy {np.__version__}",
    "cases": cases,
}
path = pathlib.Path("tests/fixtures/homography.json")
path.write_text(json.dumps(out, indent=1) + "\n")
print(f"wrote {path} with {len(cases)} cases")
