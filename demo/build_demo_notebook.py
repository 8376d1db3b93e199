"""Writes demo/perpend-demo.ipynb, the demo notebook (a scenario of our own, fixed seed).

Scenario (invented for the demo): a centrifugal pump's housing accelerometer (the primary channel)
records a bearing tone buried under mains hum at exactly f0 = 50 Hz with its harmonics and under
motor vibration that reaches the housing through an unknown 12-tap path. A second accelerometer on
the motor (the reference channel) sees the motor vibration alone. A four-sensor rail and a complex
baseband capture complete the set. Run: .venv/bin/python demo/build_demo_notebook.py
"""

import pathlib

import nbformat

cells = [
    (
        "markdown",
        "intro",
        "# Perpend demo: pump housing vibration\n\n"
        "An invented scenario with a fixed seed. The housing accelerometer (`primary`) carries a "
        "bearing tone at 737 Hz, mains hum at exactly f0 = 50 Hz with harmonics 2-5, and motor "
        "vibration that arrives through an unknown 12-tap path from the motor accelerometer "
        "(`reference`). Open the Perpend panel in the right sidebar to see the arrays below.",
    ),
    (
        "code",
        "setup",
        "import numpy as np\n\n"
        "rng = np.random.default_rng(20261201)  # fixed seed: the demo is reproducible\n"
        "fs = 4000.0        # sample rate, Hz\n"
        "f0 = 50.0          # mains frequency, Hz (exact)\n"
        "n_samples = 32000  # 8 s\n"
        "t = np.arange(n_samples) / fs",
    ),
    (
        "code",
        "reference",
        "# Motor vibration: white noise coloured by a short resonant filter.\n"
        "motor = np.convolve(rng.standard_normal(n_samples + 64),\n"
        "                    np.exp(-np.arange(64) / 9.0) * np.cos(2 * np.pi * 310.0 * np.arange(64) / fs),\n"
        "                    mode='valid')[:n_samples]\n"
        "reference = motor / motor.std()\n"
        "reference",
    ),
    (
        "code",
        "primary",
        "path = 0.6 * np.exp(-np.arange(12) / 3.0) * np.cos(0.9 * np.arange(12))  # unknown to the filter\n"
        "hum = sum(0.8 / k * np.sin(2 * np.pi * k * f0 * t + 0.3 * k) for k in range(1, 6))\n"
        "bearing = 0.05 * np.sin(2 * np.pi * 737.0 * t)\n"
        "primary = bearing + hum + np.convolve(reference, path)[:n_samples] + 0.01 * rng.standard_normal(n_samples)\n"
        "primary",
    ),
    (
        "code",
        "rail",
        "# Four sensors along the discharge rail: K x N, samples along the last axis.\n"
        "delays = np.array([0, 3, 7, 12])\n"
        "rail = np.stack([np.roll(primary, d) * g for d, g in zip(delays, [1.0, 0.8, 0.6, 0.45])])\n"
        "rail += 0.02 * rng.standard_normal(rail.shape)\n"
        "rail",
    ),
    (
        "code",
        "baseband",
        "# Complex baseband of the primary channel around the bearing tone (complex128).\n"
        "baseband = (primary * np.exp(-2j * np.pi * 737.0 * t))[::8]\n"
        "baseband",
    ),
    (
        "code",
        "link",
        "# A QPSK link through a short complex channel, for the equalizer: 4000 unit-energy symbols\n"
        "# (the first 500 are the training sequence), received with complex white noise.\n"
        "n_sym = 4000\n"
        "symbols = np.exp(1j * (np.pi / 4 + np.pi / 2 * rng.integers(0, 4, n_sym)))\n"
        "channel = np.array([1.0, 0.35 - 0.2j, -0.12 + 0.08j])  # invented for the demo\n"
        "noise = (rng.standard_normal(n_sym) + 1j * rng.standard_normal(n_sym)) * 0.03 / np.sqrt(2)\n"
        "received = np.convolve(symbols, channel)[:n_sym] + noise\n"
        "received",
    ),
    (
        "code",
        "array",
        "# An 8-element line array at half-wavelength spacing: a wanted source at broadside and a\n"
        "# jammer at 35 degrees, 2000 complex snapshots (sensors x snapshots). Steering vectors\n"
        "# a_m = exp(-j 2 pi (d / wavelength) m sin(theta)), element 0 the phase reference.\n"
        "n_el, n_snap, spacing, wavelength = 8, 2000, 0.5, 1.0\n"
        "def steer(deg):\n"
        "    return np.exp(-2j * np.pi * spacing / wavelength * np.arange(n_el) * np.sin(np.deg2rad(deg)))\n"
        "wanted = 0.3 * np.exp(2j * np.pi * 0.01 * np.arange(n_snap))\n"
        "jammer = 3.0 * (rng.standard_normal(n_snap) + 1j * rng.standard_normal(n_snap)) / np.sqrt(2)\n"
        "sensors = np.outer(steer(0.0), wanted) + np.outer(steer(35.0), jammer)\n"
        "sensors += 0.01 * (rng.standard_normal(sensors.shape) + 1j * rng.standard_normal(sensors.shape))\n"
        "sensors.shape",
    ),
    (
        "code",
        "long",
        "# A long record (1e6 samples, 250 s at fs) through the same 12-tap path, for long runs.\n"
        "n_long = 1_000_000\n"
        "long_reference = rng.standard_normal(n_long)\n"
        "long_primary = np.convolve(long_reference, path)[:n_long] + 0.01 * rng.standard_normal(n_long)\n"
        "long_primary.shape",
    ),
    (
        "code",
        "summary",
        "{name: (a.shape, str(a.dtype)) for name, a in\n"
        " dict(reference=reference, primary=primary, rail=rail, baseband=baseband,\n"
        "      symbols=symbols, received=received, sensors=sensors, long_primary=long_primary).items()}",
    ),
]

nb = nbformat.v4.new_notebook()
nb.metadata["kernelspec"] = {"name": "python3", "display_name": "Python 3 (ipykernel)", "language": "python"}
nb.metadata["language_info"] = {"name": "python"}
for kind, cell_id, source in cells:
    cell = nbformat.v4.new_markdown_cell(source) if kind == "markdown" else nbformat.v4.new_code_cell(source)
    cell["id"] = cell_id
    nb.cells.append(cell)
nbformat.validate(nb)
out = pathlib.Path(__file__).with_name("perpend-demo.ipynb")
nbformat.write(nb, out)
print(f"wrote {out.name}")
