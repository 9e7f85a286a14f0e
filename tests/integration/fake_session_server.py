"""A FAKE rigcald TCP listener for the integration tests of `rigcal send` and `rigcal simulate --tcp`.

It stands in for rigcald's session protocol only, because rigcald is not ready on this branch:
AUTH (optional), HELLO -> OK HELLO STREAM LAST, records with @SEQ deduplicated by the stream's
high-water mark, coalesced ACK N, REJ N REASON DETAIL, ERR REASON DETAIL. It has no journal, no
decoder beyond what the tests need, and none of rigcald's checks. Integration tests against the real
daemon will be added when it lands; until then this fake is what "the server" means in these tests.

Fault injection, for the delivery guarantees:
  - drop_at: record counts (over all connections) at which the connection is cut abruptly, after
    the record is taken and before it is acknowledged;
  - lose_unacked: when cutting, also forget the records not yet acknowledged (as a server would
    that had not journaled them), so LAST goes back to the last ACK;
  - stop_at: a record count at which the server acknowledges and then goes away entirely (listener
    closed) until start() is called again; its high-water marks survive, like a restarted daemon's;
  - restart(down_s): go away and come back on the same port after down_s seconds;
  - acknowledge=False: take records but never ACK them;
  - answer_hello=False: accept connections and read, but never answer HELLO.
"""
import re
import socket
import threading
import time

RECORD = re.compile(r"^@(\d+) (.*)$")


class FakeSessionServer:
    def __init__(self, secret=None, reject=None, drop_at=(), lose_unacked=False, stop_at=None, acknowledge=True,
                 answer_hello=True):
        self.secret = secret
        self.reject = reject or (lambda text: None)   # text -> None or (reason, detail)
        self.drop_at = set(drop_at)
        self.lose_unacked = lose_unacked
        self.stop_at = stop_at
        self.acknowledge = acknowledge
        self.answer_hello = answer_hello
        self.lock = threading.Lock()
        self.high_water = {}     # stream -> highest seq taken (durable, survives restarts)
        self.records = {}        # stream -> [(seq, text)] in arrival order, each seq once
        self.duplicates = 0      # records dropped because seq <= high-water mark
        self.received = 0        # records seen, duplicates included
        self.connections = 0
        self.hellos = []         # stream names, one per HELLO
        self.port = None
        self.listener = None
        self.open_sockets = set()
        self.running = False

    # ---- lifecycle ----

    def start(self):
        self.listener = socket.socket(socket.AF_INET, socket.SOCK_STREAM)
        self.listener.setsockopt(socket.SOL_SOCKET, socket.SO_REUSEADDR, 1)
        self.listener.bind(("127.0.0.1", self.port or 0))
        self.port = self.listener.getsockname()[1]
        self.listener.listen(16)
        self.running = True
        threading.Thread(target=self._accept_loop, args=(self.listener,), daemon=True).start()
        return self

    def stop(self):
        """Goes away: listener and every connection closed. State is kept."""
        self.running = False
        if self.listener:
            # shutdown() first: on Linux it wakes the thread blocked in accept(), close() alone does not.
            for step in (lambda: self.listener.shutdown(socket.SHUT_RDWR), self.listener.close):
                try:
                    step()
                except OSError:
                    pass
        with self.lock:
            sockets = list(self.open_sockets)
        for s in sockets:
            self._cut(s)

    def restart(self, down_s):
        self.stop()
        time.sleep(down_s)
        self.start()

    def address(self):
        return f"127.0.0.1:{self.port}"

    def stored(self, stream):
        with self.lock:
            return list(self.records.get(stream, []))

    # ---- connections ----

    def _accept_loop(self, listener):
        while self.running:
            try:
                conn, _ = listener.accept()
            except OSError:
                return
            if not self.running:
                self._cut(conn)
                return
            with self.lock:
                self.connections += 1
                self.open_sockets.add(conn)
            threading.Thread(target=self._serve, args=(conn,), daemon=True).start()

    @staticmethod
    def _cut(conn):
        try:
            conn.shutdown(socket.SHUT_RDWR)
        except OSError:
            pass
        conn.close()

    def _send(self, conn, line):
        try:
            conn.sendall((line + "\n").encode())
        except OSError:
            pass

    def _serve(self, conn):
        buf = b""
        authenticated = self.secret is None
        stream = None
        acked = 0
        try:
            while True:
                try:
                    chunk = conn.recv(65536)
                except OSError:
                    return
                if not chunk:
                    return
                buf += chunk
                *lines, buf = buf.split(b"\n")
                for raw in lines:
                    line = raw.decode().rstrip("\r")
                    if not authenticated:
                        if line == f"AUTH {self.secret}":
                            authenticated = True
                            continue
                        self._send(conn, "ERR not_authenticated the listener needs AUTH with its secret first")
                        return
                    if line.startswith("AUTH "):
                        continue
                    if line.startswith("HELLO "):
                        stream = line.split(" ", 1)[1]
                        with self.lock:
                            self.hellos.append(stream)
                            last = self.high_water.get(stream, 0)
                        acked = last
                        if self.answer_hello:
                            self._send(conn, f"OK HELLO {stream} {last}")
                        continue
                    m = RECORD.match(line)
                    if stream is None or not m:
                        self._send(conn, "ERR unexpected_command records need HELLO and @SEQ here")
                        return
                    seq, text = int(m.group(1)), m.group(2)
                    outcome = self._take(stream, seq, text, acked)
                    if outcome == "cut":
                        return
                    if outcome == "stop":
                        with self.lock:
                            acked = self.high_water[stream]
                        self._send(conn, f"ACK {acked}")
                        threading.Thread(target=self.stop, daemon=True).start()
                        return
                    if isinstance(outcome, tuple):
                        self._send(conn, f"REJ {seq} {outcome[0]} {outcome[1]}")
                # One ACK per chunk read: coalesced, as the protocol allows.
                with self.lock:
                    hw = self.high_water.get(stream, 0) if stream else 0
                if self.acknowledge and stream is not None and hw > acked:
                    acked = hw
                    self._send(conn, f"ACK {acked}")
        finally:
            with self.lock:
                self.open_sockets.discard(conn)
            self._cut(conn)

    def _take(self, stream, seq, text, acked):
        with self.lock:
            self.received += 1
            if seq <= self.high_water.get(stream, 0):
                self.duplicates += 1
                return None
            self.high_water[stream] = seq
            verdict = self.reject(text)
            if verdict is None:
                self.records.setdefault(stream, []).append((seq, text))
            count = self.received
            if count in self.drop_at:
                if self.lose_unacked:
                    # Forget what was never acknowledged: it was not "journaled".
                    self.high_water[stream] = acked
                    self.records[stream] = [(s, t) for s, t in self.records.get(stream, []) if s <= acked]
                return "cut"
            if self.stop_at is not None and count == self.stop_at:
                return "stop"
        return verdict
