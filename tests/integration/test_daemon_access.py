"""Who gets in: listeners on loopback unless configured, allow lists per listener, shared-secret
authentication of senders and of the control socket, TLS with and without client certificates
(Python's ssl and openssl s_client as clients), a hook that inherits nothing, and the permissions
of every file rigcald writes."""
import os
import shutil
import socket
import ssl
import stat
import subprocess
import time

import pytest

from conftest import RIGCAL, RIGCALD
from daemon_harness import Daemon, free_port, pair_lines


def inputs_with(d, line):
    text = d.config.read_text()
    start = text.index("inputs:") + len("inputs:")
    d.write_config(text[:start] + "\n  tcp:\n    - " + line + "\n" + text[text.index("outputs:"):])


def listening_addresses(port):
    """Local addresses of the TCP sockets listening on `port` (from /proc/net/tcp and tcp6)."""
    found = []
    for name in ("/proc/net/tcp", "/proc/net/tcp6"):
        for row in open(name).read().splitlines()[1:]:
            local, state = row.split()[1], row.split()[3]
            addr, p = local.split(":")
            if state == "0A" and int(p, 16) == port:  # 0A: LISTEN
                if len(addr) == 8:
                    found.append(socket.inet_ntop(socket.AF_INET, bytes.fromhex(addr)[::-1]))
                else:
                    raw = bytes.fromhex(addr)
                    found.append(socket.inet_ntop(socket.AF_INET6, b"".join(raw[i:i + 4][::-1] for i in range(0, 16, 4))))
    return found


def connect_from(source, port, timeout=5):
    s = socket.socket()
    s.settimeout(timeout)
    s.bind((source, 0))
    s.connect(("127.0.0.1", port))
    return s


def read_until_closed(s, timeout=5):
    s.settimeout(timeout)
    data = b""
    try:
        while True:
            chunk = s.recv(4096)
            if not chunk:
                break
            data += chunk
    except ConnectionResetError:
        pass
    return data


def test_listeners_bind_to_loopback_unless_an_address_is_configured(tmp_path):
    d = Daemon(tmp_path)
    inputs_with(d, f"{{name: rig-lan, port: {d.tcp_port}}}")  # no address; the harness's historian has none either
    assert "address" not in d.config.read_text().split("historian:")[1].split("\n")[1]
    d.start()
    try:
        assert listening_addresses(d.tcp_port) == ["127.0.0.1"]
        assert listening_addresses(d.historian_port) == ["127.0.0.1"]
        with pytest.raises(ConnectionRefusedError):  # another loopback address is not served
            socket.create_connection(("127.0.0.2", d.tcp_port), timeout=5)
        with pytest.raises(ConnectionRefusedError):
            socket.create_connection(("127.0.0.2", d.historian_port), timeout=5)
    finally:
        assert d.stop() == 0


def test_the_allow_list_refuses_peers_outside_it_on_each_listener(tmp_path):
    d = Daemon(tmp_path)
    inputs_with(d, f"{{name: rig-lan, address: 0.0.0.0, port: {d.tcp_port}, allow: [127.0.0.1/32]}}")
    d.write_config(d.config.read_text().replace(
        f"listen: {{port: {d.historian_port}, queue_records: 200}}",
        f"listen: {{address: 0.0.0.0, port: {d.historian_port}, queue_records: 200, allow: [127.0.0.1/32]}}"))
    d.start()
    try:
        outsider = connect_from("127.0.0.2", d.tcp_port)
        outsider.sendall(b"HELLO sneaky\n@1 P TT-101 - 20.0 20.0\n")
        assert read_until_closed(outsider) == b""  # closed without a word
        insider = connect_from("127.0.0.1", d.tcp_port)
        insider.sendall(b"HELLO fine\n@1 P TT-101 - 20.0 20.01\n")
        assert b"OK HELLO fine 0" in insider.recv(4096)
        insider.close()
        d.wait_for(lambda: d.status()["channels"][0]["counters"]["pairs"] == 1, what="the insider's pair")
        st = d.status()
        assert st["inputs"][0]["refused_connections"] == 1 and st["inputs"][0]["connections"] == 1
        assert "peer not in the input's allow list, refused" in d.log() and "127.0.0.2:" in d.log()
        sub = connect_from("127.0.0.2", d.historian_port)
        assert read_until_closed(sub) == b""
        assert "historian feed: subscriber 127.0.0.2:" in d.log()
    finally:
        assert d.stop() == 0


def secret_file(tmp_path, name, text, mode=0o640):
    p = tmp_path / name
    p.write_text(text + "\n")
    p.chmod(mode)
    return p


def test_senders_must_authenticate_with_the_listeners_shared_secret(tmp_path):
    secret = secret_file(tmp_path, "sender.secret", "correct-horse-battery-staple")
    wrong = secret_file(tmp_path, "wrong.secret", "correct-horse-battery-stapler")
    d = Daemon(tmp_path)
    inputs_with(d, f"{{name: rig-lan, address: 127.0.0.1, port: {d.tcp_port}, secret_file: {secret}}}")
    d.start()
    try:
        assert "(shared secret)" in d.log()
        s = socket.create_connection(("127.0.0.1", d.tcp_port), timeout=5)
        s.sendall(b"HELLO nobody\n@1 P TT-101 - 20.0 20.0\n")
        assert read_until_closed(s) == b"ERR not_authenticated send AUTH with the listener's secret first\n"
        s = socket.create_connection(("127.0.0.1", d.tcp_port), timeout=5)
        s.sendall(b"AUTH correct-horse-battery-stapler\nHELLO guess\n@1 P TT-101 - 20.0 20.0\n")
        assert read_until_closed(s) == b"ERR not_authenticated wrong secret\n"
        s = socket.create_connection(("127.0.0.1", d.tcp_port), timeout=5)
        s.sendall(b"AUTH correct-horse-battery-staple\nHELLO right\n@1 P TT-101 - 20.0 20.01\n")
        s.settimeout(5)
        got = b""
        while b"ACK 1\n" not in got:
            got += s.recv(4096)
        assert got.startswith(b"OK HELLO right 0\n")
        s.close()
        assert d.status()["channels"][0]["counters"]["pairs"] == 1  # only the authenticated pair
        data = tmp_path / "p.txt"
        data.write_text(pair_lines([(30.0, 30.01), (40.0, 40.02)]))
        ok = subprocess.run([str(RIGCAL), "send", str(data), "--tcp", f"127.0.0.1:{d.tcp_port}", "--secret-file",
                             str(secret), "--stream", "cli"], capture_output=True, text=True, timeout=30)
        assert ok.returncode == 0 and "2 acknowledged" in ok.stdout, ok.stdout + ok.stderr
        bad = subprocess.run([str(RIGCAL), "send", str(data), "--tcp", f"127.0.0.1:{d.tcp_port}", "--secret-file",
                              str(wrong), "--stream", "cli2", "--give-up-after", "2"],
                             capture_output=True, text=True, timeout=30)
        assert bad.returncode != 0 and "not_authenticated" in bad.stdout + bad.stderr
        assert d.status()["channels"][0]["counters"]["pairs"] == 3
    finally:
        assert d.stop() == 0


def test_a_secret_file_readable_by_everyone_is_refused_at_start(tmp_path):
    secret = secret_file(tmp_path, "open.secret", "s3cret", mode=0o644)
    d = Daemon(tmp_path)
    inputs_with(d, f"{{name: rig-lan, address: 127.0.0.1, port: {d.tcp_port}, secret_file: {secret}}}")
    out = subprocess.run([str(RIGCALD), str(d.config)], capture_output=True, text=True, timeout=30)
    assert out.returncode == 75
    assert f"{secret}: secret file is readable by every user; chmod o-r it" in out.stdout + out.stderr


def test_a_secret_of_several_words_is_refused_at_start_since_auth_could_never_send_it(tmp_path):
    secret = secret_file(tmp_path, "words.secret", "correct horse battery staple")
    d = Daemon(tmp_path)
    inputs_with(d, f"{{name: rig-lan, address: 127.0.0.1, port: {d.tcp_port}, secret_file: {secret}}}")
    out = subprocess.run([str(RIGCALD), str(d.config)], capture_output=True, text=True, timeout=30)
    assert out.returncode == 75
    assert f"{secret}: the secret must be one word (AUTH takes a single argument)" in out.stdout + out.stderr
    secret_file(tmp_path, "words.secret", "  padded-secret \t")  # blanks around one word are dropped
    d.start()
    try:
        s = socket.create_connection(("127.0.0.1", d.tcp_port), timeout=5)
        s.sendall(b"AUTH padded-secret\nHELLO padded\n")
        assert s.recv(4096).startswith(b"OK HELLO padded 0")
        s.close()
    finally:
        assert d.stop() == 0


def test_the_control_socket_needs_its_secret_and_is_0660(tmp_path):
    secret = secret_file(tmp_path, "control.secret", "ctl-9f2a")
    d = Daemon(tmp_path)
    d.write_config(d.config.read_text().replace("channels:", f"control: {{secret_file: {secret}}}\nchannels:"))
    d.start(expect_ready=False)
    try:
        d.wait_for(lambda: (d.state / "control.sock").exists() and "ready:" in d.log(), what="ready")
        mode = stat.S_IMODE(os.stat(d.state / "control.sock").st_mode)
        assert mode == 0o660, oct(mode)
        assert d.control("status").startswith("ERR not_authenticated")
        assert d.control("status", secret="ctl-9f2a-wrong").startswith("ERR not_authenticated")
        assert d.control("metrics", secret="ctl-9f2b").startswith("ERR not_authenticated")
        assert '"daemon"' in d.control("status", secret="ctl-9f2a")
        assert d.control("reset TT-101").startswith("ERR not_authenticated")  # nothing runs without it
        assert "reset through the control socket" not in d.log()
        ok = subprocess.run([str(RIGCAL), "status", "--socket", str(d.state / "control.sock"), "--secret-file",
                             str(secret), "--json"], capture_output=True, text=True, timeout=30)
        assert ok.returncode == 0 and '"daemon"' in ok.stdout, ok.stdout + ok.stderr
        d.proc.send_signal(15)
        assert d.proc.wait(timeout=30) == 0
        d.proc = None
        d.log_file.close()
    finally:
        if d.proc is not None:
            d.stop()


# ---- TLS ----

def openssl(*args, cwd):
    if shutil.which("openssl") is None:
        pytest.fail("the TLS tests need the openssl command (tools/setup.sh installs it)")
    subprocess.run(["openssl", *args], cwd=cwd, check=True, capture_output=True, timeout=60)


def make_pki(dir):
    """A test CA, a server certificate for 127.0.0.1 and a client certificate, with the openssl CLI;
    plus a second CA whose client certificate the server must not take."""
    dir.mkdir()
    for ca in ("ca", "rogue-ca"):
        openssl("req", "-x509", "-newkey", "ec", "-pkeyopt", "ec_paramgen_curve:P-256", "-nodes", "-days", "2",
                "-subj", f"/CN=rigcal test {ca}", "-keyout", f"{ca}.key", "-out", f"{ca}.pem", cwd=dir)
    (dir / "server.ext").write_text("subjectAltName=IP:127.0.0.1\nextendedKeyUsage=serverAuth\n")
    (dir / "client.ext").write_text("extendedKeyUsage=clientAuth\n")
    for name, ca, ext in (("server", "ca", "server.ext"), ("client", "ca", "client.ext"),
                          ("rogue-client", "rogue-ca", "client.ext")):
        openssl("req", "-newkey", "ec", "-pkeyopt", "ec_paramgen_curve:P-256", "-nodes", "-subj", f"/CN={name}",
                "-keyout", f"{name}.key", "-out", f"{name}.csr", cwd=dir)
        openssl("x509", "-req", "-in", f"{name}.csr", "-CA", f"{ca}.pem", "-CAkey", f"{ca}.key", "-CAcreateserial",
                "-days", "2", "-extfile", ext, "-out", f"{name}.pem", cwd=dir)
        (dir / f"{name}.key").chmod(0o600)
    return dir


def tls_daemon(tmp_path, pki, client_ca=False):
    d = Daemon(tmp_path)
    tls = f"certificate_file: {pki / 'server.pem'}, private_key_file: {pki / 'server.key'}"
    if client_ca:
        tls += f", client_ca_file: {pki / 'ca.pem'}"
    inputs_with(d, f"{{name: rig-tls, address: 127.0.0.1, port: {d.tcp_port}, tls: {{{tls}}}}}")
    return d.start()


def tls_client(d, pki, cert=None):
    ctx = ssl.create_default_context(ssl.Purpose.SERVER_AUTH, cafile=str(pki / "ca.pem"))
    if cert:
        ctx.load_cert_chain(str(pki / f"{cert}.pem"), str(pki / f"{cert}.key"))
    raw = socket.create_connection(("127.0.0.1", d.tcp_port), timeout=5)
    return ctx.wrap_socket(raw, server_hostname="127.0.0.1")


def acked(sock, seq, timeout=10):
    sock.settimeout(timeout)
    got = b""
    while b"ACK %d\n" % seq not in got:
        chunk = sock.recv(4096)
        if not chunk:
            raise EOFError(got)
        got += chunk
    return got


def s_client(port, pki, text, expect, cert=None, timeout=15):
    """Runs openssl s_client, writes `text`, and returns its output once `expect` appears (or it ends).
    Standard input stays open meanwhile: s_client would shut the connection down at its end."""
    args = ["openssl", "s_client", "-connect", f"127.0.0.1:{port}", "-CAfile", str(pki / "ca.pem"),
            "-verify_return_error", "-quiet"]
    if cert:
        args += ["-cert", str(pki / f"{cert}.pem"), "-key", str(pki / f"{cert}.key")]
    p = subprocess.Popen(args, stdin=subprocess.PIPE, stdout=subprocess.PIPE, stderr=subprocess.STDOUT)
    os.set_blocking(p.stdout.fileno(), False)
    out = b""
    try:
        p.stdin.write(text.encode())
        p.stdin.flush()
        deadline = time.time() + timeout
        while time.time() < deadline and expect.encode() not in out:
            chunk = p.stdout.read()
            if chunk:
                out += chunk
            elif p.poll() is not None:
                break
            else:
                time.sleep(0.05)
    finally:
        p.kill()
        p.wait()
    return out.decode(errors="replace")


def test_tls_listener_serves_python_ssl_and_openssl_s_client_and_refuses_plaintext(tmp_path):
    pki = make_pki(tmp_path / "pki")
    d = tls_daemon(tmp_path, pki)
    try:
        assert "(TLS)" in d.log()
        c = tls_client(d, pki)
        assert c.version() in ("TLSv1.2", "TLSv1.3")
        c.sendall(b"HELLO py-tls\n@1 P TT-101 - 20.0 20.01\n@2 P TT-101 - 40.0 40.02\n")
        assert acked(c, 2).startswith(b"OK HELLO py-tls 0\n")
        c.close()
        got = s_client(d.tcp_port, pki, "HELLO s-client\n@1 P TT-101 - 60.0 60.03\n", "ACK 1")
        assert "OK HELLO s-client 0" in got and "ACK 1" in got, got
        d.wait_for(lambda: d.status()["channels"][0]["counters"]["pairs"] == 3, what="three pairs over TLS")
        # a plaintext sender on the TLS port: the handshake fails, nothing is taken
        plain = socket.create_connection(("127.0.0.1", d.tcp_port), timeout=5)
        plain.sendall(b"HELLO plain\n@1 P TT-101 - 80.0 80.0\n")
        read_until_closed(plain)
        d.wait_for(lambda: "TLS handshake failed" in d.log(), what="handshake failure logged")
        assert d.status()["channels"][0]["counters"]["pairs"] == 3
        # and a client that does not trust the certificate's CA refuses the server
        with pytest.raises(ssl.SSLCertVerificationError):
            ctx = ssl.create_default_context(cafile=str(pki / "rogue-ca.pem"))
            ctx.wrap_socket(socket.create_connection(("127.0.0.1", d.tcp_port), timeout=5),
                            server_hostname="127.0.0.1")
    finally:
        assert d.stop() == 0


def test_with_client_ca_file_only_senders_with_a_certificate_it_signed_get_in(tmp_path):
    pki = make_pki(tmp_path / "pki")
    d = tls_daemon(tmp_path, pki, client_ca=True)
    try:
        c = tls_client(d, pki, cert="client")
        c.sendall(b"HELLO mtls\n@1 P TT-101 - 20.0 20.01\n")
        assert acked(c, 1).startswith(b"OK HELLO mtls 0\n")
        c.close()
        for cert in (None, "rogue-client"):
            with pytest.raises((ssl.SSLError, ConnectionResetError, BrokenPipeError, EOFError)):
                c = tls_client(d, pki, cert=cert)
                c.sendall(b"HELLO intruder\n@1 P TT-101 - 90.0 90.0\n")
                acked(c, 1)  # TLS 1.3: the refusal arrives after the handshake, on the first read
        got = s_client(d.tcp_port, pki, "HELLO s-client-mtls\n@1 P TT-101 - 60.0 60.03\n", "ACK 1", cert="client")
        assert "OK HELLO s-client-mtls 0" in got and "ACK 1" in got, got
        got = s_client(d.tcp_port, pki, "HELLO s-client-nocert\n@1 P TT-101 - 70.0 70.0\n", "ACK 1", timeout=3)
        assert "OK HELLO" not in got, got
        d.wait_for(lambda: d.log().count("TLS handshake failed") >= 2, what="refusals logged")
        assert d.status()["channels"][0]["counters"]["pairs"] == 2
    finally:
        assert d.stop() == 0


# ---- the hook and the files ----

def test_the_hook_inherits_no_descriptor_no_environment_and_no_ignored_signal(tmp_path):
    out, fd_list, signals = tmp_path / "hook.out", tmp_path / "hook.fds", tmp_path / "hook.signals"
    hook = tmp_path / "hook.sh"
    # The signal masks are read first, with builtins only: dash blocks every signal while it forks
    # a command, so a child reading /proc/$$/status meanwhile would see that. ls runs as a child:
    # what it lists are the shell's descriptors, as the hook got them.
    hook.write_text("#!/bin/sh\n"
                    f"while read -r l; do case $l in SigBlk*|SigIgn*) echo \"$l\";; esac; done < /proc/$$/status > {signals}\n"
                    f"ls -l /proc/$$/fd > {fd_list}\n"
                    f"{{ env | sort | tr '\\n' ' '; echo; pwd; }} > {out}\n")
    hook.chmod(0o755)
    d = Daemon(tmp_path)
    d.write_config(d.config.read_text().replace(
        "outputs:\n", f"outputs:\n  alerts:\n    hook: {{program: {hook}, timeout_s: 5}}\n"))
    d.env = dict(os.environ, RIGCAL_SHOULD_NOT_LEAK="1")
    d.start()
    try:
        s = d.sender("hook-env")  # an open sender connection: must not reach the hook
        import random
        rng = random.Random(7)
        pairs = [(x, x * (1.0 if i < 300 else 1.02) + rng.gauss(0, 0.05))
                 for i, x in enumerate(rng.uniform(20, 180) for _ in range(900))]
        s.send_text(pair_lines(pairs, start_seq=1))
        s.wait_ack(900)
        d.wait_for(lambda: out.exists() and out.read_text().count("\n") >= 2, what="the hook's report")
        env, cwd = out.read_text().splitlines()[:2]
        masks = dict(line.split(":", 1) for line in signals.read_text().splitlines())
        links = {}
        for line in fd_list.read_text().splitlines():
            if " -> " in line:
                left, target = line.split(" -> ", 1)
                links[left.split()[-1]] = target
        assert links["0"].startswith("pipe:") and links["2"].startswith("pipe:"), links
        # beyond 0-2 only what the shell opened itself (the script, a saved descriptor): nothing of
        # rigcald's (its listeners, the sender's connection, the journal, epoll, the lock)
        for fd, target in links.items():
            if int(fd) > 2:
                assert not target.startswith(("socket:", "anon_inode:", "pipe:", str(d.state))), links
        assert "RIGCAL_SHOULD_NOT_LEAK" not in env
        # signals 1-31 (glibc keeps 32 and 33 for itself): SIGPIPE is ignored in rigcald, not in the hook
        assert int(masks["SigIgn"], 16) & 0x7FFFFFFF == 0, masks
        assert int(masks["SigBlk"], 16) & 0x7FFFFFFF == 0, masks
        assert cwd == "/"
        s.close()
    finally:
        assert d.stop() == 0


def test_every_file_rigcald_writes_is_0640_or_stricter_whatever_the_umask(tmp_path):
    d = Daemon(tmp_path, window=100)
    d.write_config(d.config.read_text().replace("outputs:\n", "outputs:\n  alerts: {file: alerts.jsonl}\n"))
    d.preexec = lambda: os.umask(0)  # rigcald must not rely on its caller's umask
    d.start()
    try:
        s = d.sender("perm")
        import random
        rng = random.Random(2)
        text = pair_lines([(x, x + rng.gauss(0, 0.05)) for x in (rng.uniform(20, 180) for _ in range(100))], start_seq=1)
        text += "".join(f"@{101 + i} R TT-101 - {100 + rng.gauss(0, 0.05)!r}\n" for i in range(20))
        text += "@121 P TT-101 - 1.0 x\n"  # one reject for the reject file
        s.send_text(text)
        s.wait_ack(121)
        assert "OK checkpoint" in d.control("checkpoint")
        d.wait_for(lambda: list(d.state.glob("checkpoint-*.rgc")), what="checkpoint")
        d.wait_for(lambda: list((d.state / "historian").glob("*.csv")), what="historian CSV")
        ctl = stat.S_IMODE(os.stat(d.state / "control.sock").st_mode)
        assert ctl == 0o660, oct(ctl)
        s.close()
    finally:
        assert d.stop() == 0
    seen = {}
    for p in [d.state, *d.state.rglob("*")]:
        seen[p.name] = stat.S_IMODE(p.stat().st_mode)
    for kind in ("journal-", "checkpoint-", "rejects.jsonl", "alerts.jsonl", "historian-", "rigcald.lock"):
        assert any(n.startswith(kind) for n in seen), f"no {kind} file to check: {sorted(seen)}"
    for name, mode in seen.items():
        limit = 0o750 if (name == "state" or name == "historian" or name == "archive") else 0o640
        assert mode & ~limit == 0, f"{name} has mode {oct(mode)}, more than {oct(limit)}"
