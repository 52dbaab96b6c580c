"""PyTorch twin of mesofield's like-for-like training step (src/bench/like-for-like.ts).

Same network (tanh MLP 2 -> 3xH -> 1, weights handed over from the tfjs side), same
points, same loss: mean of r^2, r = du/ds - d2u/dx2 - (du/dx)^2 + 2 cos(2 pi x / L),
with the input derivatives by autograd (create_graph=True), then torch.optim.Adam
(lr from the file, betas 0.9/0.999, eps 1e-8: the same settings as src/autodiff/adam.ts).
One thread unless told otherwise, float32.

usage: python3 mde_step.py WEIGHTS.json STEPS ROUNDS [THREADS]  (THREADS default 1)
prints one JSON line: {"ms": [median ms per step of each round], "losses": [first 3 losses],
"threads": THREADS, "torch": version, "blas": the BLAS library the process loaded}

The figure depends on that library: Debian's torch links the generic libblas.so.3, which
resolves (update-alternatives) to the reference BLAS unless an optimised one such as
libopenblas0 is installed; the bench prints which one ran.
"""
import json
import math
import statistics
import sys
import time

import torch


def loaded_blas() -> str:
    """The BLAS shared library mapped into this process (after torch has run a matmul)."""
    try:
        with open("/proc/self/maps") as f:
            paths = {line.split()[-1] for line in f if "blas" in line.lower() and "/" in line}
        return ", ".join(sorted(paths)) or "none found"
    except OSError:
        return "unknown"


def main() -> None:
    path, steps, rounds = sys.argv[1], int(sys.argv[2]), int(sys.argv[3])
    torch.set_num_threads(int(sys.argv[4]) if len(sys.argv) > 4 else 1)
    with open(path) as f:
        spec = json.load(f)
    layers = []
    for kernel, bias, (fan_in, fan_out) in zip(spec["kernels"], spec["biases"], spec["shapes"]):
        lin = torch.nn.Linear(fan_in, fan_out)
        with torch.no_grad():
            # tfjs kernels are [in, out] row-major; torch weights are [out, in].
            lin.weight.copy_(torch.tensor(kernel, dtype=torch.float32).reshape(fan_in, fan_out).t())
            lin.bias.copy_(torch.tensor(bias, dtype=torch.float32))
        layers.append(lin)
    mods = []
    for i, lin in enumerate(layers):
        mods.append(lin)
        if i + 1 < len(layers):
            mods.append(torch.nn.Tanh())
    net = torch.nn.Sequential(*mods)
    x = torch.tensor(spec["x"], dtype=torch.float64)
    s = torch.tensor(spec["s"], dtype=torch.float64)
    inp = torch.stack([x, s], dim=1).float().requires_grad_(True)
    w = (2 * torch.cos(2 * math.pi * x / spec["period"])).float()
    opt = torch.optim.Adam(net.parameters(), lr=spec["learningRate"], betas=(0.9, 0.999), eps=1e-8)

    def step() -> float:
        opt.zero_grad()
        u = net(inp)
        g = torch.autograd.grad(u.sum(), inp, create_graph=True)[0]
        ux, us = g[:, 0], g[:, 1]
        uxx = torch.autograd.grad(ux.sum(), inp, create_graph=True)[0][:, 0]
        r = us - uxx - ux * ux + w
        loss = (r * r).mean()
        loss.backward()
        opt.step()
        return loss.item()

    losses = [step() for _ in range(3)]
    medians = []
    for _ in range(rounds):
        step()
        t = []
        for _ in range(steps):
            t0 = time.perf_counter()
            step()
            t.append(1000 * (time.perf_counter() - t0))
        medians.append(statistics.median(t))
    print(json.dumps({"ms": medians, "losses": losses, "threads": torch.get_num_threads(), "torch": torch.__version__, "blas": loaded_blas()}))


if __name__ == "__main__":
    main()
