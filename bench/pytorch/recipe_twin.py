"""PyTorch twin of mesofield's adam+lbfgs recipe (src/bench/recipe-twin.ts drives it).

The problem is the one our recipe's L-BFGS phase minimises (src/training/train-loop.ts,
polishCycle with the 'alternating' strategy): cycles of
  1. a field step: the field network is refitted to the SCFT update w + lambda d computed
     from the propagator networks' own densities (src/network/field-update.ts), then
  2. L-BFGS on the propagator networks alone, on the loss
         mde = mean over every collocation point of q and of q-dagger of r^2,
         r = du/ds - D (d2u/dx2 + (du/dx)^2) + w,   u = ln q,
     with w frozen at the field network's values at the points (docs/physics.md, "Network
     solutions"); with the exact periodic features and the exact initial condition the
     periodicity and initial terms are identically 0, and incompressibility and
     self-consistency enter only through the field step (that is what the recipe minimises).
The networks are the same: per-block tanh MLPs on the features
  [sin(k_1 x), cos(k_1 x), ..., sin(k_M x), cos(k_M x), sigma],  k_m = 2 pi m / L,
  sigma = (s - s_k)/Delta_k, u = U_k(x) + (s - s_k) n_k(x, sigma), U_k = sum_{j<k} Delta_j n_j(x, 1)
(src/network/propagator-net.ts, features.ts), starting from the weights node hands over
after its warm start, at the same collocation points (the tensor grid and the extra points
node drew). The derivative channels (value, d/dx, d2/dx2, d/ds) are carried forward through
the network as in src/autodiff/jet.ts, so one backward pass gives the parameter gradient.

Where it differs from our run, and why:
  - The field step is node's own (FieldUpdater: the same code, so the same update); node
    sends the frozen w at every collocation point before each cycle. The twin replaces the
    optimiser of the propagators, which is what is being compared.
  - Optimiser: torch.optim.LBFGS with line_search_fn='strong_wolfe', history 20, gradient
    tolerance 1e-9 (ours: numerics/lbfgs.ts, Nocedal & Wright Alg. 7.5 + 3.5/3.6, history 20,
    the same tolerance). torch keeps its history in the parameters' dtype, float32; ours keeps
    the flattened parameters and its history in float64 and rounds to float32 for each loss.
  - No Adam phase: the twin starts L-BFGS from the warm-started networks; our recipe runs
    300 Adam steps (with two field updates and its own redraw of the extra points) first.
  - float32 throughout (as tfjs); the features are computed in float64 and rounded once, as
    ours are. One thread (torch.set_num_threads(1)): our trainer is one thread.
Error measure: phi_A relative L2 against the reference phi_A node hands over, on the
reference's grid, the densities by Simpson quadrature (weights from node, 64 contour steps
per block, as network-solution.ts evaluates), normalised by Q = mean q(x, 1), the lamella moved
to the phase convention (physics/phase-convention.ts: mode p of phi_A peaks at x = 0) before
the comparison. Node checks this measure against its own on the starting networks.

usage: python3 recipe_twin.py SPEC.json   then one JSON command per line on stdin:
  {"cmd": "fields", "w": {"q": [...], "qDagger": [...]}}  -> {"ok": true, "loss": ...}
  {"cmd": "lbfgs", "iterations": N}                       -> {"iterations", "evaluations",
        "loss", "cpuSeconds", "wallSeconds", "phiError", "nets": {name: [[kernel, bias], ...] per piece}}
  {"cmd": "quit"}
The first line written is {"ok": true, "torch", "threads", "blas", "phiError", "loss": null}.
"""
import json
import math
import sys
import time

import numpy as np
import torch


def loaded_blas() -> str:
    try:
        with open("/proc/self/maps") as f:
            paths = {line.split()[-1] for line in f if "blas" in line.lower() and "/" in line}
        return ", ".join(sorted(p.split("/")[-1] for p in paths)) or "none found"
    except OSError:
        return "unknown"


class Jet:
    """Value and derivative channels: v [n, c], dx [n, c] or None, dxx, ds ([n, c] or a broadcast [1, c])."""

    def __init__(self, v, dx=None, dxx=None, ds=None):
        self.v, self.dx, self.dxx, self.ds = v, dx, dxx, ds


def features(x: np.ndarray, s: np.ndarray, period: float, modes: int, start: float, length: float, derivatives: bool) -> Jet:
    """The propagator features of features.ts (float64, rounded once to float32)."""
    n = len(x)
    w = 2 * modes + 1
    v = np.zeros((n, w))
    dx = np.zeros((n, w))
    dxx = np.zeros((n, w))
    for m in range(1, modes + 1):
        k = 2 * math.pi * m / period
        sn, cs = np.sin(k * x), np.cos(k * x)
        o = 2 * (m - 1)
        v[:, o], v[:, o + 1] = sn, cs
        dx[:, o], dx[:, o + 1] = k * cs, -k * sn
        dxx[:, o], dxx[:, o + 1] = -k * k * sn, -k * k * cs
    v[:, w - 1] = (s - start) / length
    f = lambda a: torch.tensor(a, dtype=torch.float32)
    if not derivatives:
        return Jet(f(v))
    ds = np.zeros((1, w))
    ds[0, w - 1] = 1 / length
    return Jet(f(v), f(dx), f(dxx), f(ds))


def mlp(layers, j: Jet) -> Jet:
    """tanh MLP on jets: z = aW + b, then tanh with t' = 1 - t^2, t'' = -2 t t' (Faa di Bruno to second order)."""
    v, dx, dxx, ds = j.v, j.dx, j.dxx, j.ds
    last = len(layers) - 1
    for l, (W, b) in enumerate(layers):
        v = v @ W + b
        if dx is not None:
            dx, dxx = dx @ W, dxx @ W
        if ds is not None:
            ds = ds @ W
        if l < last:
            t = torch.tanh(v)
            t1 = 1 - t * t
            if dx is not None:
                dxx = -2 * t * t1 * dx * dx + t1 * dxx
                dx = t1 * dx
            if ds is not None:
                ds = t1 * ds
            v = t
    return Jet(v, dx, dxx, ds)


class Propagator:
    """One propagator network: per-block pieces (start, length, layers)."""

    def __init__(self, spec, period, modes):
        self.period, self.modes = period, modes
        self.pieces = []
        for p in spec["pieces"]:
            layers = []
            for layer in p["layers"]:
                fi, fo = layer["fanIn"], layer["fanOut"]
                W = torch.tensor(layer["kernel"], dtype=torch.float32).reshape(fi, fo).requires_grad_(True)
                b = torch.tensor(layer["bias"], dtype=torch.float32).reshape(1, fo).requires_grad_(True)
                layers.append((W, b))
            self.pieces.append({"start": p["start"], "length": p["length"], "layers": layers})

    def parameters(self):
        return [t for p in self.pieces for layer in p["layers"] for t in layer]

    def weights(self):
        return [[[W.detach().reshape(-1).tolist(), b.detach().reshape(-1).tolist()] for W, b in p["layers"]] for p in self.pieces]

    def piece_of(self, s: np.ndarray) -> np.ndarray:
        """Index of the piece of each s (a junction point belongs to the later piece)."""
        k = np.zeros(len(s), dtype=int)
        for i, p in enumerate(self.pieces):
            if i > 0:
                k[s >= p["start"]] = i
        return k


class PointBatch:
    """The points of one piece of one side, prepared once: features, offsets, junction features."""

    def __init__(self, net: Propagator, piece: int, x: np.ndarray, s: np.ndarray, derivatives: bool):
        p = net.pieces[piece]
        self.net, self.piece, self.derivatives = net, piece, derivatives
        self.feat = features(x, s, net.period, net.modes, p["start"], p["length"], derivatives)
        self.offset = torch.tensor(s - p["start"], dtype=torch.float32).reshape(-1, 1)
        self.junction = None
        if piece > 0:
            ux, index = np.unique(x, return_inverse=True)
            jf = features(ux, np.ones(len(ux)), net.period, net.modes, 0.0, 1.0, derivatives)
            jf.ds = None  # U_k depends on x only
            self.junction = (jf, torch.tensor(index.reshape(-1), dtype=torch.long))

    def log_q(self) -> Jet:
        net, k = self.net, self.piece
        n = mlp(net.pieces[k]["layers"], self.feat)
        o = self.offset
        if self.derivatives:
            u = Jet(o * n.v, o * n.dx, o * n.dxx, n.v + o * n.ds)
        else:
            u = Jet(o * n.v)
        if self.junction is not None:
            jf, index = self.junction
            for j in range(k):
                t = mlp(net.pieces[j]["layers"], jf)
                d = net.pieces[j]["length"]
                u.v = u.v + d * t.v[index]
                if self.derivatives:
                    u.dx = u.dx + d * t.dx[index]
                    u.dxx = u.dxx + d * t.dxx[index]
        return u


class Side:
    """The collocation points of one propagator, split by piece, with D and the frozen w at each."""

    def __init__(self, net: Propagator, spec):
        x, s = np.asarray(spec["x"], dtype=float), np.asarray(spec["s"], dtype=float)
        D = np.asarray(spec["diffusivity"], dtype=float)
        k = net.piece_of(s)
        self.rows = [np.nonzero(k == i)[0] for i in range(len(net.pieces))]
        self.batches = [PointBatch(net, i, x[r], s[r], True) if len(r) else None for i, r in enumerate(self.rows)]
        self.D = [torch.tensor(D[r], dtype=torch.float32).reshape(-1, 1) for r in self.rows]
        self.w = [None for _ in self.rows]

    def set_w(self, w):
        w = np.asarray(w, dtype=float)
        self.w = [torch.tensor(w[r], dtype=torch.float32).reshape(-1, 1) for r in self.rows]

    def squared_residuals(self):
        out = []
        for b, D, w in zip(self.batches, self.D, self.w):
            if b is None:
                continue
            u = b.log_q()
            r = u.ds - D * (u.dxx + u.dx * u.dx) + w
            out.append((r * r).reshape(-1))
        return out


class Evaluation:
    """phi_A relative L2 against the reference, as src/training/train-run.ts (phiErrorOf) measures it."""

    def __init__(self, nets, spec):
        e = spec["evaluation"]
        self.x = np.asarray(e["x"], dtype=float)
        self.period, self.periods = spec["period"], e["periods"]
        self.ref = np.asarray(e["referencePhiA"], dtype=float)
        self.cA = np.asarray(e["weightsA"], dtype=float)
        nx = len(self.x)
        self.grids = {}
        for side in ("q", "qDagger"):
            net = nets[spec["sides"][side]["net"]]
            s_nodes = np.asarray(e[side]["s"], dtype=float)
            xs, ss = np.tile(self.x, len(s_nodes)), np.repeat(s_nodes, nx)
            k = net.piece_of(ss)
            rows = [np.nonzero(k == i)[0] for i in range(len(net.pieces))]
            self.grids[side] = (rows, [PointBatch(net, i, xs[r], ss[r], False) if len(r) else None for i, r in enumerate(rows)], len(s_nodes))

    def log_q(self, side):
        rows, batches, ns = self.grids[side]
        u = np.zeros(ns * len(self.x))
        with torch.no_grad():
            for r, b in zip(rows, batches):
                if b is not None:
                    u[r] = b.log_q().v.reshape(-1).double().numpy()
        return u.reshape(ns, len(self.x))

    def phi_error(self) -> float:
        q, qd = np.exp(self.log_q("q")), np.exp(self.log_q("qDagger"))
        Q = q[-1].mean()
        # phi_A = (1/Q) sum_i c^A_i q(x, s_i) q-dagger(x, 1 - s_i): row n-1-i of q-dagger (physics/contour.ts).
        phi = (self.cA[:, None] * q * qd[::-1]).sum(axis=0) / Q
        phi = self.in_convention(phi)
        return float(np.sqrt(((phi - self.ref) ** 2).sum() / (self.ref ** 2).sum()))

    def in_convention(self, u):
        """u moved by the shift that puts mode p's peak at x = 0 (physics/phase-convention.ts), by its Fourier series."""
        n, p, L = len(u), self.periods, self.period
        c = np.fft.rfft(u)
        if not (2 * abs(c[p]) / n > 1e-9):
            return u
        k = 2 * math.pi * p / L
        # u ~ a cos(k x + arg c_p): u(x + delta) peaks at x = 0 for delta = -arg(c_p) / k.
        delta = -math.atan2(c[p].imag, c[p].real) / k
        span = L / p
        delta -= span * round(delta / span)
        if abs(delta) < 1e-12 * L:
            return u
        m = np.arange(len(c))
        return np.fft.irfft(c * np.exp(1j * 2 * math.pi * m / L * delta), n)


def main() -> None:
    torch.set_num_threads(1)
    with open(sys.argv[1]) as f:
        spec = json.load(f)
    nets = {name: Propagator(n, spec["period"], spec["fourierModes"]) for name, n in spec["networks"].items()}
    sides = [Side(nets[spec["sides"][k]["net"]], spec["sides"][k]) for k in ("q", "qDagger")]
    params = [t for n in nets.values() for t in n.parameters()]
    evaluation = Evaluation(nets, spec)
    lb = spec["lbfgs"]

    def loss():
        return torch.cat([r for side in sides for r in side.squared_residuals()]).mean()

    def reply(obj):
        sys.stdout.write(json.dumps(obj) + "\n")
        sys.stdout.flush()

    reply({"ok": True, "torch": torch.__version__, "threads": torch.get_num_threads(), "blas": loaded_blas(), "phiError": evaluation.phi_error(), "loss": None})
    for line in sys.stdin:
        cmd = json.loads(line)
        if cmd["cmd"] == "quit":
            return
        if cmd["cmd"] == "fields":
            for side, k in zip(sides, ("q", "qDagger")):
                side.set_w(cmd["w"][k])
            with torch.no_grad():
                reply({"ok": True, "loss": loss().item()})
        elif cmd["cmd"] == "lbfgs":
            n = int(cmd["iterations"])
            # A fresh optimiser per cycle: the fields changed, so the loss did (ours starts a new L-BFGS per cycle too).
            opt = torch.optim.LBFGS(params, lr=1, max_iter=n, max_eval=20 * n, tolerance_grad=lb["gradientTolerance"], tolerance_change=0.0, history_size=lb["history"], line_search_fn="strong_wolfe")
            evaluations = 0

            def closure():
                nonlocal evaluations
                evaluations += 1
                opt.zero_grad()
                f = loss()
                f.backward()
                return f

            c0, t0 = time.process_time(), time.perf_counter()
            opt.step(closure)
            cpu, wall = time.process_time() - c0, time.perf_counter() - t0
            state = opt.state[opt._params[0]]
            with torch.no_grad():
                f = loss().item()
            reply({"iterations": int(state.get("n_iter", 0)), "evaluations": evaluations, "loss": f, "cpuSeconds": cpu, "wallSeconds": wall, "phiError": evaluation.phi_error(), "nets": {k: v.weights() for k, v in nets.items()}})
        else:
            reply({"error": f"unknown command {cmd['cmd']}"})


if __name__ == "__main__":
    main()
