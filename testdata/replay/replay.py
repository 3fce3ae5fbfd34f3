#!/usr/bin/python3
"""Independent replay of a loopgate waveform file (format version 1).

Usage: /usr/bin/python3 replay.py WAVEFORM.json [WAVEFORM.json ...]

For each file the script rebuilds the Hamiltonian of every sample, propagates
the gate and prints one JSON line:

  {"file": ..., "fidelity_quantised": ..., "leakage_quantised": ...,
   "fidelity_unquantised": ..., "leakage_unquantised": ...,
   "stored_fidelity": ..., "stored_leakage": ...,
   "abs_diff": ..., "leakage_abs_diff": ...,
   "samples": ..., "code_mismatches": ..., "padding_nonzero": ...}

abs_diff is |fidelity_quantised - stored_fidelity| and leakage_abs_diff is
|leakage_quantised - stored_leakage|.

Everything here comes from the file itself and from its JSON Schema
(schemas/waveform.schema.json): the "hamiltonian_convention" text, the field
descriptions, and the verification.model block. No loopgate source code was
read for the physics or for the file layout; the schema was sufficient for
the layout.

The physics, as the file states it (hbar = 1, angular frequency = 2 pi x Hz):

  H_j = sum_k 2 pi (detuning_hz[k] + track_k[j]) |k><k|
      + sum_c (f_c / 2) 2 pi (I_c[j] + i Q_c[j]) |upper_c><lower_c| + h.c.

Sample j holds for dt = 1 / sample_rate_hz (zero-order hold), and
U = exp(-i H_{N-1} dt) ... exp(-i H_1 dt) exp(-i H_0 dt), taken over all
`samples` samples including the zero padding at the end. Each step is exact:
H_j is Hermitian, H_j = V diag(w) V^dagger (numpy.linalg.eigh), so
exp(-i H_j dt) = V diag(exp(-i w dt)) V^dagger.

The quantised drive is the DAC output, I = i_code x full_scale_hz /
(2^(dac_bits - 1) - 1) and likewise Q; the unquantised drive is i_hz, q_hz.

Average gate fidelity with leakage (Pedersen, Moller and Molmer, Phys. Lett.
A 367, 47 (2007)): with P the projector on the qubit levels and
M = P U_target^dagger U P (a d x d matrix on the qubit levels, d their number),

  F = (Tr(M^dagger M) + |Tr M|^2) / (d (d + 1)),   leakage = 1 - Tr(M^dagger M) / d.

The replay covers the ideal hardware model only (no amplitude or detuning
errors, no decay, no dephasing, no filter, exact phases), which is the model
the stored verification of a designed waveform uses; a file whose
verification.model is anything else is refused with a message, not replayed
approximately.
"""

import json
import math
import sys

import numpy as np

# The convention text this replay implements, word for word. A file that
# states a different convention is refused: the replay must then be reviewed
# against the new text rather than silently applying the old physics.
CONVENTION = (
    "hbar = 1; angular frequencies are 2π times the Hz values in this file. "
    "H(t) = Σ_k 2π (detuning_hz[k] + level_detunings[k](t)) |k⟩⟨k| + "
    "Σ_c (f_c/2) 2π (I_c(t) + i Q_c(t)) |upper_c⟩⟨lower_c| + h.c., "
    "with f_c the channel's factor. Sample j holds over "
    "[j/sample_rate_hz, (j+1)/sample_rate_hz) (zero-order hold) and the gate "
    "is U = Π_j exp(−i H_j Δt), later samples acting after earlier ones. "
    "The verified drive is the DAC output I = i_code × full_scale_hz / "
    "(2^(dac_bits−1) − 1), and likewise Q. Decay and dephasing enter only as "
    "stated in verification.model."
)


class ReplayError(Exception):
    """A file the replay cannot use; the message names the file and field."""


def need(cond, path, field, msg):
    if not cond:
        raise ReplayError(f"{path}: {field}: {msg}")


def load(path):
    try:
        with open(path, encoding="utf-8") as f:
            wf = json.load(f)
    except (OSError, ValueError) as e:
        raise ReplayError(f"{path}: {e}") from None
    need(isinstance(wf, dict), path, "(top level)", "not a JSON object")
    need(wf.get("format") == "loopgate-waveform", path, "format", "not a loopgate waveform file")
    need(wf.get("version") == 1, path, "version", f"version {wf.get('version')!r}, this replay reads version 1")
    need(
        wf.get("hamiltonian_convention") == CONVENTION,
        path,
        "hamiltonian_convention",
        "differs from the convention this replay implements; review the replay against the new text",
    )
    return wf


def check_ideal_model(wf, path):
    """Refuse any verification model other than the ideal quantised one."""
    m = wf["verification"]["model"]
    f = "verification.model."
    for key in ("amplitude_error", "one_photon_detuning_hz", "two_photon_detuning_hz",
                "decay_per_s", "dephasing_per_s", "rise_time_s"):
        need(m[key] == 0, path, f + key, f"{m[key]!r}; this replay covers the ideal model only")
    need(all(e == 0 for e in m["channel_amplitude_errors"]), path, f + "channel_amplitude_errors",
         "non-zero; this replay covers the ideal model only")
    need(m.get("filter", "none") == "none", path, f + "filter", f"{m.get('filter')!r}; this replay covers filter none only")
    need(m.get("phase_step_rad", 0) == 0, path, f + "phase_step_rad", "non-zero; this replay covers exact phases only")
    need(m["quantized"] is True, path, f + "quantized", "false; the stored figures are then not those of the DAC codes")


def layout(wf, path):
    """Level indices, channel couplings and the sample count, checked."""
    scheme = wf["scheme"]
    names = [lv["name"] for lv in scheme["levels"]]
    index = {n: k for k, n in enumerate(names)}
    need(len(index) == len(names), path, "scheme.levels", "level names are not unique")
    n = wf["samples"]
    need(isinstance(n, int) and n >= 1, path, "samples", f"{n!r} is not a positive integer")

    chans = scheme["channels"]
    need(len(wf["channels"]) == len(chans), path, "channels", "count differs from scheme.channels")
    couplings = []
    for c, (sc, ch) in enumerate(zip(chans, wf["channels"])):
        field = f"channels[{c}]"
        need(ch["name"] == sc["name"], path, field + ".name", f"{ch['name']!r}, scheme.channels says {sc['name']!r}")
        for end in ("lower", "upper"):
            need(sc[end] in index, path, f"scheme.channels[{c}].{end}", f"unknown level {sc[end]!r}")
        need(sc["lower"] != sc["upper"], path, f"scheme.channels[{c}]", "lower and upper are the same level")
        for key in ("i_hz", "q_hz", "i_code", "q_code"):
            need(len(ch[key]) == n, path, f"{field}.{key}", f"{len(ch[key])} values, samples is {n}")
        couplings.append((index[sc["upper"]], index[sc["lower"]], float(sc["factor"])))

    tracks = np.zeros((len(names), n))
    for t, tr in enumerate(wf["level_detunings"]):
        field = f"level_detunings[{t}]"
        need(tr["level"] in index, path, field + ".level", f"unknown level {tr['level']!r}")
        need(len(tr["hz"]) == n, path, field + ".hz", f"{len(tr['hz'])} values, samples is {n}")
        tracks[index[tr["level"]]] += np.asarray(tr["hz"], dtype=float)

    qubit = []
    for q, name in enumerate(scheme["qubit_levels"]):
        need(name in index, path, f"scheme.qubit_levels[{q}]", f"unknown level {name!r}")
        qubit.append(index[name])
    d = len(qubit)
    target = np.asarray(wf["target"]["re"], dtype=float) + 1j * np.asarray(wf["target"]["im"], dtype=float)
    need(target.shape == (d, d), path, "target", f"shape {target.shape}, want {d}x{d} (scheme.qubit_levels)")

    static = np.asarray([lv["detuning_hz"] for lv in scheme["levels"]], dtype=float)
    need(wf["sample_rate_hz"] > 0, path, "sample_rate_hz", "must be positive")
    return couplings, static, tracks, qubit, target


def drives(wf, quantised):
    """Complex drive z = I + iQ per channel and sample (Hz)."""
    hw = wf["hardware"]
    top = 2 ** (hw["dac_bits"] - 1) - 1
    out = []
    for c, ch in enumerate(wf["channels"]):
        if quantised:
            scale = hw["full_scale_hz"][c] / top
            i = np.asarray(ch["i_code"], dtype=float) * scale
            q = np.asarray(ch["q_code"], dtype=float) * scale
        else:
            i = np.asarray(ch["i_hz"], dtype=float)
            q = np.asarray(ch["q_hz"], dtype=float)
        out.append(i + 1j * q)
    return out


def hamiltonians(couplings, static, tracks, z):
    """H_j for every sample, in rad/s, as an (N, L, L) array."""
    levels, n = tracks.shape
    h = np.zeros((n, levels, levels), dtype=complex)
    for k in range(levels):
        h[:, k, k] = 2 * math.pi * (static[k] + tracks[k])
    for (u, l, f), zc in zip(couplings, z):
        half = (f / 2) * 2 * math.pi * zc
        h[:, u, l] += half
        h[:, l, u] += np.conj(half)
    return h


def propagate(h, dt):
    """U = exp(-i H_{N-1} dt) ... exp(-i H_0 dt), each step exact via eigh."""
    w, v = np.linalg.eigh(h)  # batched over samples
    steps = (v * np.exp(-1j * w * dt)[:, None, :]) @ np.conj(np.swapaxes(v, 1, 2))
    u = np.eye(h.shape[1], dtype=complex)
    for s in steps:
        u = s @ u  # later samples act after earlier ones
    return u


def gate_fidelity(u, target, qubit):
    """Average gate fidelity with leakage and the leakage (Pedersen et al. 2007)."""
    d = len(qubit)
    m = target.conj().T @ u[np.ix_(qubit, qubit)]
    tr_mm = np.trace(m.conj().T @ m).real
    return (tr_mm + abs(np.trace(m)) ** 2) / (d * (d + 1)), 1 - tr_mm / d


def code_mismatches(wf):
    """Codes that differ from round(i_hz / full_scale_hz x (2^(bits-1) - 1)),
    halves away from zero, as the schema documents."""
    hw = wf["hardware"]
    top = 2 ** (hw["dac_bits"] - 1) - 1
    bad = 0
    for c, ch in enumerate(wf["channels"]):
        for hz, code in (("i_hz", "i_code"), ("q_hz", "q_code")):
            x = np.asarray(ch[hz], dtype=float) / hw["full_scale_hz"][c] * top
            want = np.sign(x) * np.floor(np.abs(x) + 0.5)
            bad += int(np.count_nonzero(want != np.asarray(ch[code], dtype=float)))
    return bad


def padding_nonzero(wf):
    """Non-zero codes or values after the last segment (the schema says zero padding)."""
    end = max(s["first_sample"] + s["samples"] for s in wf["segments"])
    bad = 0
    for ch in wf["channels"]:
        for key in ("i_hz", "q_hz", "i_code", "q_code"):
            bad += int(np.count_nonzero(np.asarray(ch[key][end:], dtype=float)))
    return bad


def replay(path):
    wf = load(path)
    check_ideal_model(wf, path)
    couplings, static, tracks, qubit, target = layout(wf, path)
    dt = 1.0 / wf["sample_rate_hz"]
    result = {"file": path}
    for name, quantised in (("quantised", True), ("unquantised", False)):
        h = hamiltonians(couplings, static, tracks, drives(wf, quantised))
        f, leak = gate_fidelity(propagate(h, dt), target, qubit)
        result["fidelity_" + name] = float(f)
        result["leakage_" + name] = float(leak)
    stored = wf["verification"]
    result["stored_fidelity"] = stored["fidelity"]
    result["stored_leakage"] = stored["leakage"]
    result["abs_diff"] = abs(result["fidelity_quantised"] - stored["fidelity"])
    result["leakage_abs_diff"] = abs(result["leakage_quantised"] - stored["leakage"])
    result["samples"] = wf["samples"]
    result["code_mismatches"] = code_mismatches(wf)
    result["padding_nonzero"] = padding_nonzero(wf)
    return result


def main(argv):
    if len(argv) < 2:
        print("usage: replay.py WAVEFORM.json [WAVEFORM.json ...]", file=sys.stderr)
        return 2
    status = 0
    for path in argv[1:]:
        try:
            print(json.dumps(replay(path), ensure_ascii=False))
        except ReplayError as e:
            print(f"replay: {e}", file=sys.stderr)
            status = 1
        except (KeyError, TypeError) as e:
            print(f"replay: {path}: missing or malformed field: {e!r}", file=sys.stderr)
            status = 1
    return status


if __name__ == "__main__":
    sys.exit(main(sys.argv))
