"""Writes tests/fixtures/metrics.json: tracking metrics from TrackEval and py-motmetrics.

References (versions recorded in the fixture):
- TrackEval: trackeval.metrics.HOTA, CLEAR and Identity, eval_sequence on data built here (box IoU
  from trackeval's own _calculate_box_ious, ids renumbered 0..n-1, every frame from 1 to the last);
- py-motmetrics: motmetrics.utils.compare_to_groundtruth(gt, ts, 'iou', distth=0.5) and its metrics.
Sequences: the real ground truth and tracker output shipped in the motmetrics wheel
(data/TUD-Campus, data/TUD-Stadtmitte), and small simulated cases with an occlusion and id swaps.
Both libraries predate numpy 2, so the removed aliases are restored before import.
Run from the repository root:  python3 tests/reference/make_metric_fixtures.py
"""
import json
import os
import pathlib

import numpy as np

for name, value in [("float", float), ("int", int), ("bool", bool)]:
    if not hasattr(np, name):
        setattr(np, name, value)
if not hasattr(np, "asfarray"):
    np.asfarray = lambda a, dtype=float: np.asarray(a, dtype=dtype)

import motmetrics as mm  # noqa: E402
import trackeval  # noqa: E402
from importlib.metadata import version  # noqa: E402


def read_rows(text):
    rows = []
    for line in text.strip().splitlines():
        v = line.split(",")
        rows.append((int(float(v[0])), int(float(v[1])), *[float(x) for x in v[2:6]]))
    return rows


def trackeval_scores(gt_rows, tr_rows):
    frames = max([r[0] for r in gt_rows + tr_rows] or [0])
    gt_ids = sorted({r[1] for r in gt_rows})
    tr_ids = sorted({r[1] for r in tr_rows})
    gmap = {k: i for i, k in enumerate(gt_ids)}
    tmap = {k: i for i, k in enumerate(tr_ids)}
    data = {"gt_ids": [], "tracker_ids": [], "similarity_scores": [], "num_timesteps": frames,
            "num_gt_ids": len(gt_ids), "num_tracker_ids": len(tr_ids),
            "num_gt_dets": len(gt_rows), "num_tracker_dets": len(tr_rows)}
    ds = trackeval.datasets.MotChallenge2DBox.__new__(trackeval.datasets.MotChallenge2DBox)
    for f in range(1, frames + 1):
        g = [r for r in gt_rows if r[0] == f]
        t = [r for r in tr_rows if r[0] == f]
        data["gt_ids"].append(np.array([gmap[r[1]] for r in g], dtype=int))
        data["tracker_ids"].append(np.array([tmap[r[1]] for r in t], dtype=int))
        gb = np.array([r[2:6] for r in g], dtype=float).reshape(-1, 4)
        tb = np.array([r[2:6] for r in t], dtype=float).reshape(-1, 4)
        data["similarity_scores"].append(ds._calculate_box_ious(gb, tb, box_format="xywh"))
    out = {}
    hota = trackeval.metrics.HOTA().eval_sequence(data)
    clear = trackeval.metrics.CLEAR().eval_sequence(data)
    ident = trackeval.metrics.Identity().eval_sequence(data)
    out["hota"] = float(np.mean(hota["HOTA"]))
    out["deta"] = float(np.mean(hota["DetA"]))
    out["assa"] = float(np.mean(hota["AssA"]))
    out["loca"] = float(np.mean(hota["LocA"]))
    out["mota"] = float(clear["MOTA"])
    out["motp"] = float(clear["MOTP"])
    out["id_switches"] = int(clear["IDSW"])
    out["fragmentations"] = int(clear["Frag"])
    out["mostly_tracked"] = int(clear["MT"])
    out["mostly_lost"] = int(clear["ML"])
    out["false_positives"] = int(clear["CLR_FP"])
    out["misses"] = int(clear["CLR_FN"])
    out["idf1"] = float(ident["IDF1"])
    out["idp"] = float(ident["IDP"])
    out["idr"] = float(ident["IDR"])
    return out


def motmetrics_scores(gt_text, tr_text, tmp):
    gp, tp = tmp / "gt.txt", tmp / "ts.txt"
    gp.write_text(gt_text)
    tp.write_text(tr_text)
    gt = mm.io.loadtxt(str(gp), fmt="mot15-2D", min_confidence=-1)
    ts = mm.io.loadtxt(str(tp), fmt="mot15-2D")
    acc = mm.utils.compare_to_groundtruth(gt, ts, "iou", distth=0.5)
    names = ["mota", "motp", "idf1", "idp", "idr", "num_switches", "num_false_positives", "num_misses",
             "mostly_tracked", "mostly_lost", "num_fragmentations"]
    s = mm.metrics.create().compute(acc, metrics=names, name="seq")
    return {k: float(s[k].iloc[0]) for k in names}


def to_text(rows):
    return "".join(f"{f},{i},{x},{y},{w},{h},1,-1,-1,-1\n" for f, i, x, y, w, h in rows)


def simulated_cases():
    cases = []
    # Two walkers crossing; the tracker swaps their ids after they meet, and loses one for 3 frames
    # behind the other (an occlusion).
    gt, tr = [], []
    for f in range(1, 41):
        a = (f, 1, 10 + 5 * f, 100, 30, 80)
        b = (f, 2, 210 - 5 * f, 104, 30, 80)
        gt += [a, b]
        ta = (f, 7 if f <= 20 else 8, a[2] + 1.5, a[3] - 1, 31, 79)
        tb = (f, 8 if f <= 20 else 7, b[2] - 2, b[3] + 2, 29, 82)
        if not 18 <= f <= 20:
            tr.append(ta)
        tr.append(tb)
    tr.append((5, 99, 400, 300, 20, 20))  # a false positive
    cases.append(("two walkers: occlusion and an id swap", gt, tr))
    # Three people, jittered boxes, a track that breaks and resumes under a new id, frames without
    # ground truth.
    rng = np.random.default_rng(3)
    gt, tr = [], []
    for f in range(1, 61):
        for pid, (x0, vx) in enumerate([(20, 3), (300, -2), (150, 1)], start=1):
            if pid == 3 and 25 <= f <= 30:
                continue
            g = (f, pid, x0 + vx * f, 50 + 40 * pid, 25, 60)
            gt.append(g)
            if rng.random() < 0.1:
                continue
            tid = pid if not (pid == 2 and f > 40) else 20
            j = rng.normal(scale=2.0, size=4)
            tr.append((f, tid, g[2] + j[0], g[3] + j[1], 25 + j[2], 60 + j[3]))
    for f in range(61, 66):
        tr.append((f, 1, 200, 90, 25, 60))
    cases.append(("three people: jitter, a broken track, tracker boxes after the truth ends", gt, tr))
    return cases


def main():
    tmp = pathlib.Path("target/metric-fixtures")
    tmp.mkdir(parents=True, exist_ok=True)
    data_dir = pathlib.Path(mm.__file__).parent / "data"
    sequences = []
    for name in ["TUD-Campus", "TUD-Stadtmitte"]:
        gt_text = (data_dir / name / "gt.txt").read_text()
        tr_text = (data_dir / name / "test.txt").read_text()
        sequences.append((name, gt_text, tr_text))
    for name, gt, tr in simulated_cases():
        sequences.append((name, to_text(gt), to_text(tr)))
    cases = []
    for name, gt_text, tr_text in sequences:
        gt_rows, tr_rows = read_rows(gt_text), read_rows(tr_text)
        cases.append({
            "name": name,
            "gt": gt_text,
            "tracks": tr_text,
            "trackeval": trackeval_scores(gt_rows, tr_rows),
            "motmetrics": motmetrics_scores(gt_text, tr_text, tmp),
        })
    out = {
        "source": f"trackeval {version('trackeval')} (HOTA, CLEAR, Identity eval_sequence); "
                  f"motmetrics {version('motmetrics')} (compare_to_groundtruth iou 0.5); numpy {np.__version__}",
        "cases": cases,
    }
    path = pathlib.Path("tests/fixtures/metrics.json")
    path.write_text(json.dumps(out, indent=1) + "\n")
    print(f"wrote {path} with {len(cases)} cases")


if __name__ == "__main__":
    main()
