"""Serial input through a real pseudo-terminal: rigcald opens the slave side with its configured
line settings; the test writes records to the master side. A device that disappears (the master
closed, its node gone) and comes back under the same path is reopened."""
import os
import pty
import random
import time
import tty

from daemon_harness import Daemon, ols


def open_pty_behind(link):
    master, slave = pty.openpty()
    tty.setraw(master)
    name = os.ttyname(slave)
    os.close(slave)  # rigcald opens the slave by name; the pair lives while the master is open
    if os.path.islink(link):
        os.unlink(link)
    os.symlink(name, link)
    return master


def serial_config(device):
    return f"""
  serial:
    - {{name: well-a, device: {device}, baud: 115200, data_bits: 8, parity: none, stop_bits: 1,
        flow_control: none, reopen_initial_ms: 50, reopen_max_ms: 200}}
"""


def lines_for(pairs):
    return "".join(f"P TT-101 - {x!r} {y!r}\r\n" for x, y in pairs).encode()


def make_pairs(n, seed):
    rng = random.Random(seed)
    return [(round(x, 4), round(x + rng.gauss(0, 0.05), 4)) for x in (rng.uniform(20, 180) for _ in range(n))]


def test_pairs_over_a_pseudo_terminal_reach_the_fit(tmp_path):
    link = tmp_path / "ttyRIG"
    master = open_pty_behind(str(link))
    d = Daemon(tmp_path, inputs=serial_config(link), window=1000).start()
    try:
        d.wait_for(lambda: "input well-a: opened" in d.log(), what="serial port opened")
        pairs = make_pairs(300, seed=1)
        data = lines_for(pairs)
        for i in range(0, len(data), 13):  # reads cut lines anywhere
            os.write(master, data[i:i + 13])
        d.wait_for(lambda: d.status("TT-101")["counters"]["pairs"] == 300, what="300 pairs")
        fit = d.status("TT-101")["fit"]
        ref = ols(*zip(*pairs))
        assert abs(fit["b1"] - ref["b1"]) < 1e-10
        assert d.status()["inputs"][0]["name"] == "well-a"
        os.write(master, b"P TT-101 - 80.0 eighty\r\n")
        d.wait_for(lambda: d.status()["inputs"][0]["rejects"].get("bad_number") == 1, what="reject counted")
        rej = d.read_jsonl("rejects.jsonl")
        d.wait_for(lambda: d.read_jsonl("rejects.jsonl"), what="reject file")
        assert d.read_jsonl("rejects.jsonl")[0]["source"] == f"serial:well-a {link}"
    finally:
        assert d.stop() == 0
        os.close(master)


def test_a_serial_device_that_disappears_and_returns_is_reopened(tmp_path):
    link = tmp_path / "ttyRIG"
    master = open_pty_behind(str(link))
    d = Daemon(tmp_path, inputs=serial_config(link), window=1000).start()
    try:
        d.wait_for(lambda: "input well-a: opened" in d.log(), what="serial port opened")
        first = make_pairs(100, seed=2)
        os.write(master, lines_for(first))
        d.wait_for(lambda: d.status("TT-101")["counters"]["pairs"] == 100, what="first 100 pairs")
        os.write(master, b"P TT-101 - 50.0 ")  # a partial line when the adapter is pulled out
        time.sleep(0.1)
        os.close(master)  # unplugged: the slave node goes away
        os.unlink(link)
        d.wait_for(lambda: "reopening" in d.log(), what="failure noticed")
        time.sleep(0.5)  # rigcald retries while the device is absent
        master = open_pty_behind(str(link))  # plugged back in (a new /dev/pts node)
        d.wait_for(lambda: d.log().count("input well-a: opened") >= 2, what="port reopened")
        second = make_pairs(100, seed=3)
        os.write(master, lines_for(second))
        d.wait_for(lambda: d.status("TT-101")["counters"]["pairs"] == 200, what="200 pairs")
        assert d.status()["inputs"][0]["rejects_total"] == 0  # the partial line was dropped, not glued on
        fit = d.status("TT-101")["fit"]
        assert abs(fit["b1"] - ols(*zip(*(first + second)))["b1"]) < 1e-10
    finally:
        assert d.stop() == 0
        os.close(master)
