"""Pairs over real loopback TCP into the real rigcald: the fit, partial lines, CRLF, rejects with
their reasons while the stream goes on, and the resend/dedup guarantee."""
import json
import random
import socket
import time

from daemon_harness import Daemon, ols, pair_lines


def make_pairs(n, seed=1, slope=1.0, offset=0.0):
    rng = random.Random(seed)
    out = []
    for _ in range(n):
        x = round(rng.uniform(20, 180), 4)
        out.append((x, round(offset + slope * x + rng.gauss(0, 0.05), 4)))
    return out


def test_the_fit_equals_a_batch_fit_of_the_pairs_sent(tmp_path):
    d = Daemon(tmp_path, window=1000).start()
    try:
        pairs = make_pairs(700)
        s = d.sender("fit-test")
        s.send_text(pair_lines(pairs, start_seq=1))
        s.wait_ack(700)
        fit = d.status("TT-101")["fit"]
        ref = ols(*zip(*pairs))
        assert fit["n"] == 700
        assert abs(fit["b1"] - ref["b1"]) < 1e-10 * abs(ref["b1"])
        assert abs(fit["b0"] - ref["b0"]) < 1e-9
        assert abs(fit["s"] - ref["s"]) < 1e-9 * ref["s"]
    finally:
        assert d.stop() == 0


def test_lines_split_across_segments_and_crlf_endings_are_read_whole(tmp_path):
    d = Daemon(tmp_path).start()
    try:
        pairs = make_pairs(50, seed=2)
        text = pair_lines(pairs).replace("\n", "\r\n")
        sock = socket.create_connection(("127.0.0.1", d.tcp_port))
        sock.setsockopt(socket.IPPROTO_TCP, socket.TCP_NODELAY, 1)
        for i in range(0, len(text), 7):  # 7-byte segments cut through numbers and line ends
            sock.sendall(text[i:i + 7].encode())
            if i % 210 == 0:
                time.sleep(0.002)
        d.wait_for(lambda: d.status("TT-101")["counters"]["pairs"] == 50, what="50 pairs")
        assert d.status()["inputs"][0]["rejects_total"] == 0
        sock.close()
    finally:
        assert d.stop() == 0


def test_a_garbled_line_is_rejected_with_its_reason_and_the_stream_goes_on(tmp_path):
    d = Daemon(tmp_path).start()
    try:
        s = d.sender("garble")
        good = make_pairs(20, seed=3)
        lines = pair_lines(good[:10], start_seq=1)
        lines += "@11 P TT-101 - 80.0 8O.1\n"        # letter O for zero
        lines += "@12 P XX-999 - 80.0 80.1\n"        # unknown channel
        lines += "@13 P TT-101 - nan 80.1\n"
        lines += b"@14 P TT-101 - 80.0 \xff\xfe\n".decode("latin-1")
        lines += pair_lines(good[10:], start_seq=15)
        s.send_text(lines.encode("latin-1"))
        s.wait_ack(24)
        rej = [r for r in s.replies if r.startswith("REJ")]
        assert rej[0].startswith("REJ 11 bad_number sensor: \"8O.1\" is not a decimal number")
        assert rej[1].startswith("REJ 12 unknown_channel no channel 'XX-999' is configured")
        assert rej[2].startswith("REJ 13 not_finite")
        assert rej[3].startswith("REJ 14 bad_utf8")
        st = d.status()
        assert st["channels"][0]["counters"]["pairs"] == 20
        assert st["inputs"][0]["rejects"] == {"bad_number": 1, "unknown_channel": 1, "not_finite": 1, "bad_utf8": 1}
        d.wait_for(lambda: len(d.read_jsonl("rejects.jsonl")) == 4, what="reject file")
        entries = d.read_jsonl("rejects.jsonl")
        assert entries[0]["reason"] == "bad_number"
        assert entries[0]["raw"] == "@11 P TT-101 - 80.0 8O.1"
        assert entries[0]["source"].startswith("tcp:rig-lan 127.0.0.1:")
        assert entries[0]["line"] == 12  # the HELLO line is line 1
        assert entries[3]["raw"] is None and entries[3]["raw_hex"].endswith("fffe")
    finally:
        assert d.stop() == 0


def test_resent_records_are_dropped_and_hello_reports_the_durable_high_water_mark(tmp_path):
    d = Daemon(tmp_path).start()
    try:
        pairs = make_pairs(100, seed=4)
        s = d.sender("resend")
        assert s.hello == 0
        s.send_text(pair_lines(pairs[:60], start_seq=1))
        s.wait_ack(60)
        s.close()
        s2 = d.sender("resend")
        assert s2.hello == 60
        s2.send_text(pair_lines(pairs, start_seq=1))  # a careless sender resends everything
        s2.wait_ack(100)
        st = d.status()
        assert st["channels"][0]["counters"]["pairs"] == 100
        assert st["inputs"][0]["duplicates"] == 60
    finally:
        assert d.stop() == 0


def test_a_stream_in_use_by_another_connection_is_refused(tmp_path):
    d = Daemon(tmp_path).start()
    try:
        first = d.sender("busy")
        second = socket.create_connection(("127.0.0.1", d.tcp_port), timeout=5)
        second.sendall(b"HELLO busy\n")
        answer = second.recv(4096).decode()
        assert answer.startswith("ERR stream_busy stream 'busy' is in use by another connection")
        first.close()
    finally:
        assert d.stop() == 0


def test_records_on_a_named_stream_need_sequence_numbers(tmp_path):
    d = Daemon(tmp_path).start()
    try:
        s = d.sender("numbered")
        s.send_text("P TT-101 - 20.0 20.0\n@1 P TT-101 - 21.0 21.0\n")
        s.wait_ack(1)
        assert d.status()["inputs"][0]["rejects"] == {"missing_sequence": 1}
    finally:
        assert d.stop() == 0
