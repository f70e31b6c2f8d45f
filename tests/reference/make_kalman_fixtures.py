"""Writes tests/fixtures/kalman.json: predict/update steps of filterpy's KalmanFilter on the box model.

Reference: filterpy.kalman.KalmanFilter (version recorded in the fixture), with the constant-velocity
box model of crate/core/src/kalman.rs: state [cx, cy, w, h, vcx, vcy, vw, vh], measurement
[cx, cy, w, h], noise proportional to the box height (position weight 1/20, velocity weight 1/160).
Run from the repository root:  python3 tests/reference/make_kalman_fixtures.py
"""
import json
import pathlib

import filterpy
import numpy as np
from filterpy.kalman import KalmanFilter

POS, VEL = 1.0 / 20.0, 1.0 / 160.0
rng = np.random.default_rng(7)


def noise(h):
    h = max(abs(h), 1.0)
    q = np.diag([(POS * h) ** 2] * 4 + [(VEL * h) ** 2] * 4)
    r = np.diag([(POS * h) ** 2] * 4)
    return q, r


def run(name, start, velocity, steps, missing):
    kf = KalmanFilter(dim_x=8, dim_z=4)
    kf.F = np.eye(8)
    for i in range(4):
        kf.F[i, i + 4] = 1.0
    kf.H = np.zeros((4, 8))
    for i in range(4):
        kf.H[i, i] = 1.0
    h0 = max(abs(start[3]), 1.0)
    kf.x = np.array(list(start) + [0.0] * 4, dtype=float).reshape(8, 1)
    kf.P = np.diag([(2 * POS * h0) ** 2] * 4 + [(10 * VEL * h0) ** 2] * 4)
    truth = np.array(start, dtype=float)
    out_steps = []
    for k in range(steps):
        q, _ = noise(kf.x[3, 0])
        kf.predict(Q=q)
        predicted = (kf.x.ravel().tolist(), kf.P.ravel().tolist())
        truth = truth + np.array(velocity)
        z = None
        if k not in missing:
            z = (truth + rng.normal(scale=0.05 * truth[3], size=4)).tolist()
            _, r = noise(kf.x[3, 0])
            kf.update(np.array(z).reshape(4, 1), R=r)
        out_steps.append(
            {
                "z": z,
                "predicted_x": predicted[0],
                "predicted_p": predicted[1],
                "x": kf.x.ravel().tolist(),
                "p": kf.P.ravel().tolist(),
            }
        )
    return {"name": name, "start": list(start), "steps": out_steps}


cases = [
    run("walker to the right", (100.0, 200.0, 30.0, 80.0), (1.5, 0.2, 0.0, 0.05), 40, {10, 11, 12, 30}),
    run("cyclist up and away", (300.0, 340.0, 50.0, 90.0), (0.5, -3.0, -0.1, -0.2), 30, {5, 20, 21}),
    run("far small person", (500.0, 80.0, 8.0, 20.0), (-0.4, 0.1, 0.0, 0.0), 25, set()),
]
out = {
    "source": f"filterpy {filterpy.__version__} filterpy.kalman.KalmanFilter predict(Q)/update(z, R), numpy {np.__version__}",
    "cases": cases,
}
path = pathlib.Path("tests/fixtures/kalman.json")
path.write_text(json.dumps(out) + "\n")
print(f"wrote {path} with {len(cases)} cases")
