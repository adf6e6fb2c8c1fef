#!/usr/bin/python3
"""Reference values for qkernel/device and qkernel/sim's calibrated noise,
computed with QuTiP (Debian python3-qutip 4.7.1), numpy and scipy.

Writes qkernel/device/testdata/ref_device_qutip.json:

1. relaxation: thermal relaxation of one qubit over a time t with T1, T2
   on several input states, from the Lindblad master equation
   d rho/dt = D[sqrt(1/T1) sigma_-] rho + D[sqrt(1/(2 T_phi)) sigma_z] rho,
   1/T_phi = 1/T2 - 1/(2 T1), solved exactly as
   qutip.vector_to_operator((qutip.liouvillian(H, c_ops) * t).expm()
   * qutip.operator_to_vector(rho0)).
2. depolarizing: the depolarizing strength p for which the channel
   "depolarizing(p) after relaxation over the gate time" has average gate
   fidelity 1 - r, found with scipy.optimize.brentq on
   qutip.average_gate_fidelity of the composed superoperator (one and two
   qubits; two-qubit relaxation by qutip.super_tensor).
3. circuit: a 4-qubit native circuit on an invented line device (the TOML
   text is in the fixture), with ASAP schedule, idle relaxation, gate
   depolarizing and relaxation, and per-qubit readout, simulated on the
   density matrix with QuTiP operators (Kraus operators of one-qubit
   relaxation by qutip.to_kraus, depolarizing as the Pauli twirl); the joint
   (ancilla, class) distribution after readout.

Deterministic: no random numbers; rerunning reproduces the file byte for
byte. Prints "skipped" and writes nothing when QuTiP is missing.
"""
import json
import math
import os
import sys

try:
    import numpy as np
    import qutip
    import scipy
    from scipy.optimize import brentq
except ImportError as e:  # pragma: no cover
    print("skipped: %s (install Debian's python3-qutip)" % e)
    sys.exit(0)

OUT = os.path.join(os.path.dirname(__file__), "..", "qkernel", "device", "testdata", "ref_device_qutip.json")


def relax_super(t, T1, T2):
    """Superoperator of thermal relaxation over t (same unit as T1, T2)."""
    c_ops = []
    if not math.isinf(T1):
        c_ops.append(math.sqrt(1 / T1) * qutip.destroy(2))  # |0><1|: |1> decays to |0>
    rate = 1 / T2 - 1 / (2 * T1)
    if rate > 0:
        c_ops.append(math.sqrt(rate / 2) * qutip.sigmaz())
    if not c_ops:
        return qutip.to_super(qutip.qeye(2))
    L = qutip.liouvillian(0 * qutip.sigmaz(), c_ops)
    return (L * t).expm()


def apply_super(S, rho):
    return qutip.vector_to_operator(S * qutip.operator_to_vector(rho))


PAULI = [qutip.qeye(2), qutip.sigmax(), qutip.sigmay(), qutip.sigmaz()]


def depol_kraus(p, nq):
    """Kraus operators of rho -> (1-p) rho + p I/d Tr rho, the Pauli twirl
    (1-p) rho + p/d^2 sum_P P rho P (d = 2^nq)."""
    d2 = 4 ** nq
    ks = []
    for k in range(d2):
        P = PAULI[k % 4] if nq == 1 else qutip.tensor(PAULI[k // 4], PAULI[k % 4])
        w = p / d2 + (1 - p if k == 0 else 0)
        ks.append(math.sqrt(w) * P)
    return ks


def depol_super(p, nq):
    return qutip.kraus_to_super(depol_kraus(p, nq))


def depol_for_error(r, relax, nq):
    """p with average_gate_fidelity(depol(p) * relax) = 1 - r, or 0."""
    f = lambda p: qutip.average_gate_fidelity(depol_super(p, nq) * relax) - (1 - r)
    if f(0) <= 0:
        return 0.0
    return brentq(f, 0, 1, xtol=1e-16, rtol=1e-15, maxiter=200)


def cplx(m):
    return [[[float(v.real), float(v.imag)] for v in row] for row in np.asarray(m)]


# 1. Relaxation of one qubit.
states = {
    "zero": qutip.ket2dm(qutip.basis(2, 0)),
    "one": qutip.ket2dm(qutip.basis(2, 1)),
    "plus": qutip.ket2dm((qutip.basis(2, 0) + qutip.basis(2, 1)).unit()),
    "plus_i": qutip.ket2dm((qutip.basis(2, 0) + 1j * qutip.basis(2, 1)).unit()),
    "mixed": qutip.Qobj(np.array([[0.35, 0.2 - 0.15j], [0.2 + 0.15j, 0.65]])),
}
relax_cases = []
for (t, T1, T2) in [(0.035, 120.0, 90.0), (0.4, 80.0, 150.0), (25.0, 60.0, 30.0), (200.0, 100.0, 200.0), (1.5, math.inf, 40.0)]:
    S = relax_super(t, T1, T2)
    out = {}
    for name in sorted(states):
        out[name] = cplx(apply_super(S, states[name]).full())
    relax_cases.append({"t_us": t, "t1_us": T1 if not math.isinf(T1) else "inf", "t2_us": T2, "rho": out,
                        "input": {k: cplx(v.full()) for k, v in sorted(states.items())}})

# 2. Depolarizing strength from an error rate.
depol_cases = []
for (r, ns, T1, T2, nq) in [(3e-4, 35.0, 120.0, 90.0, 1), (1e-3, 25.0, 40.0, 30.0, 1), (8e-3, 340.0, 120.0, 90.0, 2),
                             (1e-2, 300.0, 60.0, 100.0, 2), (1e-4, 2000.0, 20.0, 10.0, 1), (5e-3, 0.0, 100.0, 100.0, 2)]:
    one = relax_super(ns / 1000, T1, T2)
    relax = one if nq == 1 else qutip.super_tensor(one, one)
    depol_cases.append({"r": r, "gate_ns": ns, "t1_us": T1, "t2_us": T2, "qubits": nq, "p": depol_for_error(r, relax, nq)})

# 3. A small noisy circuit on an invented 4-qubit line device.
dev = {
    "t1_us": [110.0, 75.0, 140.0, 60.0],
    "t2_us": [90.0, 100.0, 120.0, 45.0],
    "readout_p01": [0.012, 0.02, 0.008, 0.03],
    "readout_p10": [0.025, 0.03, 0.015, 0.05],
    "gate_error": [3e-4, 5e-4, 2e-4, 8e-4],
    "gate_ns": [35.0, 40.0, 30.0, 50.0],
    "edges": [[0, 1], [1, 2], [2, 3]],
    "pair_error": [8e-3, 1.2e-2, 6e-3],
    "pair_ns": [300.0, 420.0, 260.0],
}
toml = "\n".join([
    'name = "ref-line-4"',
    'note = "invented: a 4-qubit line for the QuTiP cross-check"',
    "qubits = 4",
    'gates = "rz-sx-x-cx"',
    "edges = [[0, 1], [1, 2], [2, 3]]",
    "",
    "[qubit]",
    "t1_us = %s" % json.dumps(dev["t1_us"]),
    "t2_us = %s" % json.dumps(dev["t2_us"]),
    "readout_p01 = %s" % json.dumps(dev["readout_p01"]),
    "readout_p10 = %s" % json.dumps(dev["readout_p10"]),
    "gate_error = %s" % json.dumps(dev["gate_error"]),
    "gate_ns = %s" % json.dumps(dev["gate_ns"]),
    "",
    "[pair]",
    "gate_error = %s" % json.dumps(dev["pair_error"]),
    "gate_ns = %s" % json.dumps(dev["pair_ns"]),
    "",
])
# (gate, target, other qubit or -1, angle): cx has the control as "other".
gates = [
    ("sx", 0, -1, 0.0), ("rz", 0, -1, 0.7), ("sx", 0, -1, 0.0),
    ("sx", 3, -1, 0.0), ("rz", 3, -1, -1.1),
    ("cx", 1, 0, 0.0),
    ("sx", 2, -1, 0.0),
    ("cx", 2, 1, 0.0),
    ("rz", 2, -1, 0.4), ("sx", 2, -1, 0.0),
    ("cx", 2, 3, 0.0),
    ("x", 1, -1, 0.0),
    ("cx", 0, 1, 0.0),
    ("sx", 3, -1, 0.0),
]
ancilla, classes = 0, [2, 3]
N = 4


def on(q, U):
    """U on qubit q of N (qubit 0 least significant: tensor order N-1..0)."""
    return qutip.tensor([U if k == q else qutip.qeye(2) for k in reversed(range(N))])


def two(ctl, tgt, kind):
    P0, P1 = qutip.ket2dm(qutip.basis(2, 0)), qutip.ket2dm(qutip.basis(2, 1))
    assert kind == "cx"
    return on(ctl, P0) + on(ctl, P1) * on(tgt, qutip.sigmax())


SX = qutip.Qobj(np.array([[1 + 1j, 1 - 1j], [1 - 1j, 1 + 1j]]) / 2)


def one_gate(kind, a):
    if kind == "sx":
        return SX
    if kind == "x":
        return qutip.sigmax()
    if kind == "rz":
        return qutip.Qobj(np.diag([np.exp(-0.5j * a), np.exp(0.5j * a)]))
    raise ValueError(kind)


def kraus_on(qs, ks):
    """Full-space Kraus operators of the operators ks on qubits qs (1 or 2).
    (Kraus operators of two-qubit channels are built directly: QuTiP 4.7.1's
    to_kraus of a two-qubit superoperator did not give a trace-preserving
    set here, while its one-qubit conversion does.)"""
    out = []
    for K in ks:
        if len(qs) == 1:
            out.append(on(qs[0], K))
        else:
            # K acts on (qs[0], qs[1]) with qs[0] the most significant in S's tensor order.
            M = K.full()
            full = np.zeros((2 ** N, 2 ** N), dtype=complex)
            a, b = qs
            for i in range(2 ** N):
                for j in range(2 ** N):
                    rest_i = i & ~(1 << a) & ~(1 << b)
                    rest_j = j & ~(1 << a) & ~(1 << b)
                    if rest_i != rest_j:
                        continue
                    li = ((i >> a) & 1) * 2 + ((i >> b) & 1)
                    lj = ((j >> a) & 1) * 2 + ((j >> b) & 1)
                    full[i, j] = M[li, lj]
            out.append(qutip.Qobj(full, dims=[[2] * N, [2] * N]))
    return out


def channel(rho, ks):
    return sum((K * rho * K.dag() for K in ks), 0 * rho)


rho = qutip.tensor([qutip.ket2dm(qutip.basis(2, 0))] * N)
ready = [0.0] * N
started = [False] * N
depols = []
for (kind, t, o, a) in gates:
    qs = [t] if o < 0 else [t, o]
    start = max(ready[q] for q in qs)
    for q in qs:  # idle relaxation since the qubit's previous gate
        if started[q] and start > ready[q]:
            rho = channel(rho, kraus_on([q], qutip.to_kraus(relax_super((start - ready[q]) / 1000, dev["t1_us"][q], dev["t2_us"][q]))))
    if kind == "rz":  # virtual: no duration, no noise
        rho = on(t, one_gate(kind, a)) * rho * on(t, one_gate(kind, a)).dag()
        for q in qs:
            started[q] = True
        depols.append(0.0)
        continue
    if o < 0:
        ns, r = dev["gate_ns"][t], dev["gate_error"][t]
        U = on(t, one_gate(kind, a))
    else:
        e = [sorted(x) for x in dev["edges"]].index(sorted([t, o]))
        ns, r = dev["pair_ns"][e], dev["pair_error"][e]
        U = two(o, t, kind)
    rho = U * rho * U.dag()
    rel = [relax_super(ns / 1000, dev["t1_us"][q], dev["t2_us"][q]) for q in qs]
    relax = rel[0] if len(qs) == 1 else qutip.super_tensor(rel[0], rel[1])
    p = depol_for_error(r, relax, len(qs))
    depols.append(p)
    rho = channel(rho, kraus_on(qs, depol_kraus(p, len(qs))))
    for q, S in zip(qs, rel):
        rho = channel(rho, kraus_on([q], qutip.to_kraus(S)))
    for q in qs:
        ready[q] = start + ns
        started[q] = True
end = max(ready)
for q in range(N):  # relaxation until the joint measurement
    if started[q] and end > ready[q]:
        rho = channel(rho, kraus_on([q], qutip.to_kraus(relax_super((end - ready[q]) / 1000, dev["t1_us"][q], dev["t2_us"][q]))))
diag = np.real(np.diag(rho.full()))
nc = len(classes)
joint = [0.0] * (2 << nc)
for b, v in enumerate(diag):
    k = sum(((b >> cq) & 1) << j for j, cq in enumerate(classes))
    joint[(((b >> ancilla) & 1) << nc) | k] += float(v)
bits = classes + [ancilla]  # bit j of the outcome index is classes[j]; the top bit the ancilla
for j, q in enumerate(bits):
    p01, p10 = dev["readout_p01"][q], dev["readout_p10"][q]
    m = 1 << j
    new = list(joint)
    for i in range(len(joint)):
        if i & m == 0:
            v0, v1 = joint[i], joint[i | m]
            new[i] = (1 - p01) * v0 + p10 * v1
            new[i | m] = p01 * v0 + (1 - p10) * v1
    joint = new

fixture = {
    "generator": "scripts/ref_device_qutip.py",
    "python": sys.version.split()[0],
    "qutip": qutip.__version__,
    "numpy": np.__version__,
    "scipy": scipy.__version__,
    "relaxation": relax_cases,
    "depolarizing": depol_cases,
    "circuit": {
        "device_toml": toml,
        "gates": [{"gate": g, "target": t, "other": o, "angle": a} for (g, t, o, a) in gates],
        "ancilla": ancilla,
        "class": classes,
        "depolarizing": depols,
        "duration_ns": end,
        "joint": joint,
    },
}
os.makedirs(os.path.dirname(OUT), exist_ok=True)
with open(OUT, "w") as f:
    json.dump(fixture, f, indent=1, sort_keys=True)
    f.write("\n")
print("wrote", os.path.relpath(OUT))
