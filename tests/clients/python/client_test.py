#!/usr/bin/python3
"""shellwright.Client against a real shellwrightd on a loopback port: the
same dicts as in process, a bearer token, and failures (a dropped
connection, an unreachable server, a refused token) as exceptions, never
a partial silent result.

Run by ctest with PYTHONPATH at the package built in the build tree and
SHELLWRIGHT_BIN_DIR at the build tree (server/shellwrightd).
"""

import os
import select
import signal
import subprocess
import tempfile
import time
import unittest

import shellwright

BIN_DIR = os.environ.get("SHELLWRIGHT_BIN_DIR", "build")
SHELLWRIGHTD = os.path.join(BIN_DIR, "server", "shellwrightd")
LISTENING = "shellwrightd listening on "


class Server:
    """shellwrightd on a free 127.0.0.1 port."""

    def __init__(self, *flags):
        self.process = subprocess.Popen(
            [SHELLWRIGHTD, "--listen", "127.0.0.1:0", *flags],
            stdout=subprocess.PIPE, stderr=subprocess.DEVNULL)
        self.address = self._address(timeout=30)
        if self.address is None:
            self.stop()
            raise RuntimeError("shellwrightd did not say where it listens")

    def _address(self, timeout):
        deadline = time.monotonic() + timeout
        buffered = b""
        while time.monotonic() < deadline:
            ready, _, _ = select.select([self.process.stdout], [], [], 0.1)
            if not ready:
                continue
            chunk = os.read(self.process.stdout.fileno(), 4096)
            if not chunk:
                return None
            buffered += chunk
            for line in buffered.split(b"\n")[:-1]:
                text = line.decode()
                if text.startswith(LISTENING):
                    return text[len(LISTENING):].split()[0]
        return None

    def stop(self, sig=signal.SIGTERM):
        if self.process.poll() is None:
            self.process.send_signal(sig)
        self.process.wait(timeout=30)
        self.process.stdout.close()


RECORDS = (["La0.7Sr0.3MnO3", "Fe3O4", "CuSO4·5H2O", "Xx2O3", "", 42, None,
            {"formula": "NiO", "id": "n1", "charge": 0},
            {"formula": "Fe2O3", "colour": "red"}, b"Fe\xff"]
           + [f"LiNi{a / 100:.2f}Co{(1 - a / 100) / 2:.2f}"
              f"Mn{(1 - a / 100) / 2:.2f}O2" for a in range(30, 90)] * 20)


class ClientTest(unittest.TestCase):

    @classmethod
    def setUpClass(cls):
        cls.server = Server()

    @classmethod
    def tearDownClass(cls):
        cls.server.stop()
        # A clean SIGTERM stop (status 0): the calls left nothing hanging.
        assert cls.server.process.returncode == 0, cls.server.process.returncode

    def test_same_answers_as_in_process(self):
        with shellwright.Client(self.server.address, timeout=60) as client:
            for spec, kwargs in [("Fe3+", {}), (26, {"charge": 2}),
                                 ("Co3+", {"geometry": "octahedral",
                                           "spin_state": "low"}),
                                 ("Fe2+", {"geometry": "square_planar",
                                           "spin_state": "intermediate"})]:
                self.assertEqual(client.describe(spec, **kwargs),
                                 shellwright.describe(spec, **kwargs))
            # Square-planar d6, intermediate spin: dx2-y2 empty, two
            # unpaired (four-coordinate Fe(TPP), S = 1; Scheidt and Reed,
            # Chem. Rev. 81 (1981) 543, from memory).
            remote = client.describe("Fe2+", geometry="square_planar",
                                     spin_state="intermediate")
            self.assertEqual(remote["spin_state"], "intermediate")
            self.assertEqual(remote["ligand_field"]["unpaired_electrons"], 2)
            for formula in ["La0.7Sr0.3MnO3", "Xx2O3", ""]:
                self.assertEqual(client.analyze(formula, id="a", row=3),
                                 shellwright.analyze(formula, id="a", row=3))
            for batch_size in (1, 7, 500):
                with self.subTest(batch_size=batch_size):
                    remote = list(client.analyze_many(
                        iter(RECORDS), alternatives=1, batch_size=batch_size))
                    local = list(shellwright.analyze_many(RECORDS,
                                                          alternatives=1))
                    self.assertEqual(len(remote), len(RECORDS))
                    self.assertEqual(remote, local)
            self.assertEqual(list(client.analyze_many([])), [])
            self.assertEqual(list(client.analyze_many([None, 42])),
                             list(shellwright.analyze_many([None, 42])))

    def test_errors_carry_the_message(self):
        with shellwright.Client(self.server.address, timeout=60) as client:
            with self.assertRaises(ValueError) as remote:
                client.describe("Xx")
            with self.assertRaises(ValueError) as local:
                shellwright.describe("Xx")
            self.assertEqual(str(remote.exception), str(local.exception))
            with self.assertRaisesRegex(TypeError, "^formula: expected str"):
                client.analyze(42)
            with self.assertRaisesRegex(ValueError, "^batch_size: must be"):
                client.analyze_many([], batch_size=0)

    def test_unreachable_server(self):
        server = Server()
        address = server.address
        server.stop()
        with shellwright.Client(address, timeout=5) as client:
            with self.assertRaisesRegex(ConnectionError, "UNAVAILABLE"):
                client.describe("Fe")
            with self.assertRaises(ConnectionError):
                list(client.analyze_many(["Fe2O3"] * 10))


class DroppedConnectionTest(unittest.TestCase):

    def test_dropped_server_raises_mid_stream(self):
        server = Server()
        try:
            with shellwright.Client(server.address, timeout=60) as client:
                def records():
                    for i in range(10**9):
                        yield f"Fe{1 + i % 97}O{1 + i % 89}"
                stream = client.analyze_many(records(), batch_size=100)
                received = [next(stream) for _ in range(250)]
                self.assertEqual(len(received), 250)
                server.stop(signal.SIGKILL)
                with self.assertRaises(ConnectionError):
                    for _ in stream:
                        pass
        finally:
            server.stop(signal.SIGKILL)


class TokenTest(unittest.TestCase):

    def test_bearer_token(self):
        with tempfile.TemporaryDirectory() as tmp:
            token = os.path.join(tmp, "token")
            with open(token, "w") as f:
                f.write("s3cret-token-for-tests\n")
            wrong = os.path.join(tmp, "wrong")
            with open(wrong, "w") as f:
                f.write("another\n")
            server = Server("--auth-token-file", token)
            try:
                with shellwright.Client(server.address, token_file=token,
                                        timeout=60) as client:
                    self.assertEqual(client.analyze("NiO"),
                                     shellwright.analyze("NiO"))
                for token_file in (wrong, None):
                    with shellwright.Client(server.address,
                                            token_file=token_file,
                                            timeout=60) as client:
                        with self.assertRaises(PermissionError):
                            client.analyze("NiO")
                        with self.assertRaises(PermissionError):
                            list(client.analyze_many(["NiO"]))
                with self.assertRaisesRegex(ValueError, "^token_file: cannot "
                                                        "read"):
                    shellwright.Client(server.address,
                                       token_file=os.path.join(tmp, "none"))
            finally:
                server.stop()


if __name__ == "__main__":
    unittest.main()
