"""A straightforward SORT in Python (filterpy + SciPy), the speed peer of `throughline track`.

Written for this benchmark from the method's description (Bewley et al. 2016): a constant-velocity
Kalman filter per track on [cx, cy, area, aspect], Hungarian assignment on IoU (SciPy), min hits and
max age. It reads and writes the benchmark text format.

Usage: python3 tests/bench/sort_peer.py DETECTIONS.txt OUT.txt [--max-age 30 --min-hits 3 --iou 0.3]
"""
import argparse
import sys
import time
from collections import defaultdict

import numpy as np
from filterpy.kalman import KalmanFilter
from scipy.optimize import linear_sum_assignment


def to_z(b):
    x, y, w, h = b
    return np.array([[x + w / 2.0], [y + h / 2.0], [w * h], [w / max(h, 1e-6)]])


def to_box(state):
    cx, cy, s, r = state[:4, 0]
    w = np.sqrt(max(s * r, 0.0))
    h = s / w if w > 0 else 0.0
    return np.array([cx - w / 2.0, cy - h / 2.0, w, h])


def iou_matrix(a, b):
    if len(a) == 0 or len(b) == 0:
        return np.zeros((len(a), len(b)))
    a = np.asarray(a)[:, None, :]
    b = np.asarray(b)[None, :, :]
    x0 = np.maximum(a[..., 0], b[..., 0])
    y0 = np.maximum(a[..., 1], b[..., 1])
    x1 = np.minimum(a[..., 0] + a[..., 2], b[..., 0] + b[..., 2])
    y1 = np.minimum(a[..., 1] + a[..., 3], b[..., 1] + b[..., 3])
    inter = np.clip(x1 - x0, 0, None) * np.clip(y1 - y0, 0, None)
    union = a[..., 2] * a[..., 3] + b[..., 2] * b[..., 3] - inter
    return np.where(union > 0, inter / np.maximum(union, 1e-12), 0.0)


class Track:
    def __init__(self, box):
        kf = KalmanFilter(dim_x=7, dim_z=4)
        kf.F = np.eye(7)
        kf.F[0, 4] = kf.F[1, 5] = kf.F[2, 6] = 1.0
        kf.H = np.zeros((4, 7))
        kf.H[0, 0] = kf.H[1, 1] = kf.H[2, 2] = kf.H[3, 3] = 1.0
        kf.R[2:, 2:] *= 10.0
        kf.P[4:, 4:] *= 1000.0
        kf.P *= 10.0
        kf.Q[-1, -1] *= 0.01
        kf.Q[4:, 4:] *= 0.01
        kf.x[:4] = to_z(box)
        self.kf = kf
        self.hits = 1
        self.unseen = 0
        self.id = None
        self.boxes = []

    def predict(self):
        if self.kf.x[6, 0] + self.kf.x[2, 0] <= 0:
            self.kf.x[6, 0] = 0.0
        self.kf.predict()
        self.unseen += 1
        return to_box(self.kf.x)


def main():
    p = argparse.ArgumentParser()
    p.add_argument("detections")
    p.add_argument("out")
    p.add_argument("--max-age", type=int, default=30)
    p.add_argument("--min-hits", type=int, default=3)
    p.add_argument("--iou", type=float, default=0.3)
    p.add_argument("--min-score", type=float, default=0.3)
    a = p.parse_args()

    frames = defaultdict(list)
    last = 0
    with open(a.detections) as f:
        for line in f:
            v = line.strip().split(",")
            if len(v) < 7:
                continue
            frame, score = int(float(v[0])), float(v[6])
            last = max(last, frame)
            if score >= a.min_score:
                frames[frame].append([float(v[2]), float(v[3]), float(v[4]), float(v[5])])

    tracking_started = time.perf_counter()
    tracks, out, next_id = [], [], 1
    for frame in range(1, last + 1):
        dets = frames.get(frame, [])
        predicted = [t.predict() for t in tracks]
        iou = iou_matrix(predicted, dets)
        matched_t, matched_d = set(), set()
        if iou.size:
            rows, cols = linear_sum_assignment(-iou)
            for r, c in zip(rows, cols):
                if iou[r, c] >= a.iou:
                    t = tracks[r]
                    t.kf.update(to_z(dets[c]))
                    t.hits += 1
                    t.unseen = 0
                    matched_t.add(r)
                    matched_d.add(c)
        for d, box in enumerate(dets):
            if d not in matched_d:
                tracks.append(Track(box))
        kept = []
        for i, t in enumerate(tracks):
            if t.unseen == 0 and t.hits >= a.min_hits and t.id is None:
                t.id = next_id
                next_id += 1
            if t.unseen == 0 and t.id is not None:
                out.append((frame, t.id, to_box(t.kf.x)))
            if t.unseen <= a.max_age and not (t.id is None and t.unseen > 0):
                kept.append(t)
        tracks = kept
    tracking_seconds = time.perf_counter() - tracking_started

    with open(a.out, "w") as f:
        for frame, tid, b in sorted(out, key=lambda r: (r[0], r[1])):
            f.write(f"{frame},{tid},{b[0]:.2f},{b[1]:.2f},{b[2]:.2f},{b[3]:.2f},1,-1,-1,-1\n")
    # The loop alone (reading and writing excluded), for the speed goals of BENCHMARKS.md.
    print(f"stats: tracking {tracking_seconds:.6f} s", file=sys.stderr)
    try:
        with open("/proc/self/status") as f:
            kib = next(int(l.split()[1]) for l in f if l.startswith("VmHWM:"))
        print(f"stats: peak memory {kib / 1024:.1f} MiB", file=sys.stderr)
    except (OSError, StopIteration):
        pass


if __name__ == "__main__":
    main()
