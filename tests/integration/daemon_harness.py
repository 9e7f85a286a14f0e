"""Runs the real rigcald for integration tests: writes a configuration into a temporary directory,
starts the process, waits until its control socket answers, and offers small clients for its
TCP inputs, historian feed and control socket."""
import json
import os
import pathlib
import signal
import socket
import subprocess
import time

from conftest import RIGCALD


def free_port():
    with socket.socket() as s:
        s.bind(("127.0.0.1", 0))
        return s.getsockname()[1]


CHANNEL_TT101 = """
  - id: TT-101
    units: degC
    reference: {id: PRT-REF-07, expanded_uncertainty: 0.02, coverage_factor: 2}
    certificate: {id: CAL-TT101, intercept: 0.0, slope: 1.0, u_intercept: 0.01, u_slope: 0.0002}
    sensor: {resolution: 0.01, noise_sd: 0.05}
    range: [20, 180]
    tolerance: {absolute: 0.5}
    fit: {window_pairs: WINDOW}
    detector: {target_arl0_pairs: 1.0e7, min_slope_change: 0.005}
    alert: {clear_after: 300}
    averaging: {block_readings: 20}
"""


class Daemon:
    def __init__(self, tmp_path, channels=None, extra="", window=400, inputs=None, historian=True):
        self.dir = pathlib.Path(tmp_path)
        self.state = self.dir / "state"
        self.tcp_port = free_port()
        self.historian_port = free_port() if historian else None
        self.config = self.dir / "rigcald.yaml"
        self.log_path = self.dir / "rigcald.log"
        channels = channels if channels is not None else CHANNEL_TT101.replace("WINDOW", str(window))
        inputs = inputs if inputs is not None else f"""
  tcp:
    - {{name: rig-lan, address: 127.0.0.1, port: {self.tcp_port}, idle_timeout_s: 30}}
"""
        hist = f"    listen: {{port: {self.historian_port}, queue_records: 200}}\n" if historian else ""
        self.write_config(
            f"state_directory: {self.state}\n"
            "log_level: debug\n"
            "journal: {fsync: interval, fsync_interval_ms: 10}\n"
            "checkpoint_interval_s: 3600\n"
            f"inputs:{inputs}\n"
            "outputs:\n"
            "  historian:\n"
            f"{hist}"
            "    csv_directory: historian\n"
            + extra + "channels:" + channels)
        self.proc = None
        self.log_file = None
        self.command_prefix = []  # e.g. valgrind and its options
        self.env = None           # None: the test's own environment
        self.preexec = None       # run in the child before rigcald (resource limits, umask)

    def write_config(self, text):
        self.config.write_text(text)

    def start(self, expect_ready=True, timeout=20):
        self.log_file = open(self.log_path, "a")
        self.proc = subprocess.Popen([*self.command_prefix, str(RIGCALD), str(self.config)], stdout=self.log_file,
                                     stderr=subprocess.STDOUT, env=self.env, preexec_fn=self.preexec)
        if not expect_ready:
            return self
        deadline = time.time() + timeout
        while time.time() < deadline:
            if self.proc.poll() is not None:
                raise AssertionError(f"rigcald exited with {self.proc.returncode}:\n{self.log()}")
            try:
                self.status()
                return self
            except OSError:
                time.sleep(0.05)
        raise AssertionError("rigcald did not become ready:\n" + self.log())

    def log(self):
        return self.log_path.read_text() if self.log_path.exists() else ""

    def control(self, request, secret=None, timeout=10):
        c = socket.socket(socket.AF_UNIX)
        c.settimeout(timeout)
        c.connect(str(self.state / "control.sock"))
        # One write, as `rigcal status` does: refused, rigcald answers and closes at once, and a second
        # write could meet the closed socket (EPIPE) before the answer is read.
        try:
            c.sendall(((f"AUTH {secret}\n" if secret else "") + request + "\n").encode())
        except BrokenPipeError:
            pass  # closed before taking all of it: its answer is still there to read
        data = b""
        while True:
            try:
                b = c.recv(65536)
            except ConnectionResetError:  # rigcald closed with our request unread: the answer came first
                break
            if not b:
                break
            data += b
        c.close()
        return data.decode()

    def status(self, channel=None):
        return json.loads(self.control("status" if channel is None else f"status {channel}"))

    def stop(self, sig=signal.SIGTERM, timeout=30):
        if self.proc is None:
            return None
        self.proc.send_signal(sig)
        rc = self.proc.wait(timeout=timeout)
        self.proc = None
        self.log_file.close()
        if rc != 0:  # shown by pytest with the failure the caller's assertion makes of it
            print(f"rigcald exited with {rc}; the end of its log:\n{self.log()[-6000:]}")
        return rc

    def kill9(self):
        return self.stop(signal.SIGKILL)

    def sender(self, stream=None, timeout=10):
        return Sender(self.tcp_port, stream, timeout)

    def wait_for(self, predicate, timeout=15, what="condition"):
        deadline = time.time() + timeout
        while time.time() < deadline:
            value = predicate()
            if value:
                return value
            time.sleep(0.05)
        raise AssertionError(f"timed out waiting for {what}\n" + self.log()[-4000:])

    def read_jsonl(self, name):
        path = self.state / name
        if not path.exists():
            return []
        return [json.loads(line) for line in path.read_text().splitlines() if line.strip()]


class Sender:
    """A line-protocol client that reads the server's replies."""

    def __init__(self, port, stream=None, timeout=10):
        self.sock = socket.create_connection(("127.0.0.1", port), timeout=timeout)
        self.buffer = b""
        self.replies = []
        self.hello = None
        if stream:
            self.send_text(f"HELLO {stream}\n")
            line = self.reply()
            assert line.startswith("OK HELLO"), line
            self.hello = int(line.split()[3])

    def send_text(self, text):
        self.sock.sendall(text.encode() if isinstance(text, str) else text)

    def reply(self, timeout=10):
        self.sock.settimeout(timeout)
        while b"\n" not in self.buffer:
            chunk = self.sock.recv(65536)
            if not chunk:
                raise EOFError("connection closed")
            self.buffer += chunk
        line, self.buffer = self.buffer.split(b"\n", 1)
        text = line.decode()
        self.replies.append(text)
        return text

    def wait_ack(self, seq, timeout=15):
        deadline = time.time() + timeout
        acked = 0
        while acked < seq:
            line = self.reply(max(0.1, deadline - time.time()))
            if line.startswith("ACK "):
                acked = int(line.split()[1])
        return acked

    def close(self):
        self.sock.close()


def pair_lines(pairs, start_seq=None, channel="TT-101"):
    out = []
    for i, (x, y) in enumerate(pairs):
        prefix = f"@{start_seq + i} " if start_seq is not None else ""
        out.append(f"{prefix}P {channel} - {x!r} {y!r}\n")
    return "".join(out)


def ols(xs, ys):
    """Batch least-squares reference with numpy (centred), for comparing with the daemon's fit."""
    import numpy as np
    x = np.asarray(xs, dtype=float)
    y = np.asarray(ys, dtype=float)
    xm, ym = x.mean(), y.mean()
    sxx = ((x - xm) ** 2).sum()
    b1 = ((x - xm) * (y - ym)).sum() / sxx
    b0 = ym - b1 * xm
    resid = y - (b0 + b1 * x)
    s = (resid @ resid / (len(x) - 2)) ** 0.5
    return {"b0": b0, "b1": b1, "s": s, "mean_x": xm, "sxx": sxx, "n": len(x)}


# A channel every pair of which stays in the fit (cumulative, no screening): after any fault, its fit
# must equal the batch fit of exactly the pairs rigcald acknowledged.
CUMULATIVE_TT101 = """
  - id: TT-101
    units: degC
    reference: {id: PRT-REF-07, expanded_uncertainty: 0.02}
    certificate: {intercept: 0.0, slope: 1.0}
    sensor: {noise_sd: 0.05}
    fit: {memory: cumulative}
    detector: {kind: interval}
    screening: {enabled: false}
"""


def write_pairs(path, n, seed):
    """n TT-101 pair records without sequence numbers (rigcal send numbers them), at 4 decimals."""
    import random
    rng = random.Random(seed)
    pairs, lines = [], []
    for _ in range(n):
        x = round(rng.uniform(20, 180), 4)
        y = round(x + rng.gauss(0, 0.05), 4)
        pairs.append((x, y))
        lines.append(f"P TT-101 - {x} {y}")
    path.write_text("\n".join(lines) + "\n")
    return pairs


def assert_fit_is_batch_fit_of(d, pairs):
    """TT-101's fit in rigcald is the batch least-squares fit of `pairs`, each counted once."""
    fit = d.status("TT-101")["fit"]
    ref = ols(*zip(*pairs))
    assert fit["n"] == len(pairs), f"daemon holds {fit['n']} pairs; {len(pairs)} were acknowledged once each"
    assert abs(fit["b1"] - ref["b1"]) < 1e-10 * abs(ref["b1"])
    assert abs(fit["b0"] - ref["b0"]) < 1e-8
    assert abs(fit["s"] - ref["s"]) < 1e-9 * ref["s"]
