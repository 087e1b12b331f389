#!/usr/bin/python3
"""End-to-end test of the real shellwrightd with a Python gRPC client.

Run by ctest with /usr/bin/python3 (Debian's python3-grpcio). Each test
starts its own shellwrightd on a free 127.0.0.1 port and stops it with
SIGTERM, expecting exit status 0. Python stubs are generated at test time
into a temporary directory.

Environment (set by tests/server/CMakeLists.txt):
  SHELLWRIGHT_BIN_DIR            build tree (server/shellwrightd,
                                 clients/shellwright)
  SHELLWRIGHT_SOURCE_DIR         checkout (proto/)
  SHELLWRIGHT_PROTOC             protoc, the fallback stub generator
  SHELLWRIGHT_GRPC_PYTHON_PLUGIN grpc_python_plugin for that fallback
"""

import json
import os
import select
import shutil
import signal
import subprocess
import sys
import tempfile
import time
import unittest

HERE = os.path.dirname(os.path.abspath(__file__))
SOURCE_DIR = os.environ.get("SHELLWRIGHT_SOURCE_DIR",
                            os.path.dirname(os.path.dirname(HERE)))
BIN_DIR = os.environ.get("SHELLWRIGHT_BIN_DIR", "")
SHELLWRIGHTD = os.path.join(BIN_DIR, "server", "shellwrightd")
CLI = os.path.join(BIN_DIR, "clients", "shellwright")
SERVICE = "shellwright.v1.ElectronStructure"
LISTENING = "shellwrightd listening on "

HEALTH_PROTO = os.path.join(HERE, "proto", "grpc", "health", "v1",
                            "health.proto")

STUB_DIR = None
pb = pb_grpc = health_pb = health_grpc = grpc = None


def _generate(command_prefix, protos, out_dir):
    for root, proto in protos:
        result = subprocess.run(
            command_prefix + ["-I", root, "--python_out", out_dir,
                              "--grpc_python_out", out_dir,
                              os.path.join(root, proto)],
            capture_output=True, text=True, timeout=60)
        if result.returncode != 0:
            return result.stderr
    return None


def setUpModule():
    global STUB_DIR
    STUB_DIR = tempfile.mkdtemp(prefix="shellwright-pystubs-")
    try:
        _load_stubs()
    except BaseException:
        # unittest skips tearDownModule when setUpModule fails.
        shutil.rmtree(STUB_DIR, ignore_errors=True)
        raise


def _load_stubs():
    global pb, pb_grpc, health_pb, health_grpc, grpc
    # Debian's python3-grpcio has no grpc_health module, so the health stubs
    # come from the copy of the standard health.proto kept beside this test.
    # It is generated under another module path: a generated "grpc" package
    # would shadow grpcio itself. The proto package (and so the wire name
    # grpc.health.v1.Health) is unchanged.
    health_root = os.path.join(STUB_DIR, "protos")
    os.makedirs(os.path.join(health_root, "shellwright_test_health"))
    shutil.copy(HEALTH_PROTO, os.path.join(health_root,
                                           "shellwright_test_health"))
    protos = [
        (os.path.join(SOURCE_DIR, "proto"),
         "shellwright/v1/electron_structure.proto"),
        (health_root, "shellwright_test_health/health.proto"),
    ]
    # grpc_tools first, as Debian packages it. Its bundled protoc (from
    # python3-grpc-tools 1.14) predates proto3 `optional`, so fall back to
    # the system protoc with gRPC's Python plugin when it refuses.
    error = _generate([sys.executable, "-m", "grpc_tools.protoc"], protos,
                      STUB_DIR)
    if error is not None:
        protoc = os.environ.get("SHELLWRIGHT_PROTOC") or shutil.which("protoc")
        plugin = (os.environ.get("SHELLWRIGHT_GRPC_PYTHON_PLUGIN")
                  or shutil.which("grpc_python_plugin"))
        if not protoc or not plugin:
            raise RuntimeError("grpc_tools.protoc failed and no protoc + "
                               "grpc_python_plugin fallback: " + error)
        error = _generate([protoc, "--plugin=protoc-gen-grpc_python=" + plugin],
                          protos, STUB_DIR)
        if error is not None:
            raise RuntimeError("stub generation failed: " + error)
    sys.path.insert(0, STUB_DIR)
    import grpc as grpc_module
    from shellwright.v1 import electron_structure_pb2
    from shellwright.v1 import electron_structure_pb2_grpc
    from shellwright_test_health import health_pb2, health_pb2_grpc
    grpc = grpc_module
    pb, pb_grpc = electron_structure_pb2, electron_structure_pb2_grpc
    health_pb, health_grpc = health_pb2, health_pb2_grpc


def tearDownModule():
    if STUB_DIR:
        shutil.rmtree(STUB_DIR, ignore_errors=True)


def read_line(stream, prefix, timeout):
    """Returns the rest of the first stdout line starting with prefix."""
    deadline = time.monotonic() + timeout
    buffered = b""
    while time.monotonic() < deadline:
        ready, _, _ = select.select([stream], [], [], 0.1)
        if not ready:
            continue
        chunk = os.read(stream.fileno(), 4096)
        if not chunk:
            break
        buffered += chunk
        for line in buffered.split(b"\n")[:-1]:
            text = line.decode("utf-8", "replace")
            if text.startswith(prefix):
                return text[len(prefix):]
    return None


class ShellwrightdPythonClientTest(unittest.TestCase):

    def setUp(self):
        self.log_dir = tempfile.mkdtemp(prefix="shellwright-pytest-")
        self.stderr = open(os.path.join(self.log_dir, "stderr"), "wb")
        self.server = subprocess.Popen(
            [SHELLWRIGHTD, "--listen", "127.0.0.1:0"],
            stdout=subprocess.PIPE, stderr=self.stderr)
        self.address = read_line(self.server.stdout, LISTENING, timeout=10)
        if self.address is None:
            self.server.kill()
            self.server.wait(10)
            self.fail("shellwrightd did not print its listening line")
        self.assertTrue(self.address.startswith("127.0.0.1:"), self.address)
        self.channel = grpc.insecure_channel(self.address)
        self.stub = pb_grpc.ElectronStructureStub(self.channel)
        self.stopped = False

    def tearDown(self):
        try:
            if not self.stopped:
                self.assertEqual(self.stop_server(), 0)
        finally:
            if self.server.poll() is None:
                self.server.kill()
                self.server.wait(10)
            self.server.stdout.close()
            self.stderr.close()
            shutil.rmtree(self.log_dir, ignore_errors=True)

    def stop_server(self):
        """Closes the client, sends SIGTERM, returns the exit status."""
        self.stopped = True
        self.channel.close()
        self.server.send_signal(signal.SIGTERM)
        try:
            return self.server.wait(timeout=20)
        except subprocess.TimeoutExpired:
            self.server.kill()
            self.server.wait(10)
            return None

    def cli_json(self, *args):
        result = subprocess.run([CLI, *args, "--json"], capture_output=True,
                                text=True, timeout=30)
        self.assertEqual(result.returncode, 0, result.stderr)
        return json.loads(result.stdout)

    def test_health_is_serving_for_server_and_service(self):
        health = health_grpc.HealthStub(self.channel)
        for service in ("", SERVICE):
            response = health.Check(
                health_pb.HealthCheckRequest(service=service), timeout=10)
            self.assertEqual(response.status,
                             health_pb.HealthCheckResponse.SERVING, service)

    def test_health_unknown_service_is_not_found(self):
        health = health_grpc.HealthStub(self.channel)
        with self.assertRaises(grpc.RpcError) as raised:
            health.Check(health_pb.HealthCheckRequest(service="no.Such"),
                         timeout=10)
        self.assertEqual(raised.exception.code(), grpc.StatusCode.NOT_FOUND)

    def test_describe_gd3_matches_the_cli_json(self):
        response = self.stub.DescribeAtom(
            pb.DescribeAtomRequest(spec="Gd3+"), timeout=10)
        expected = self.cli_json("atom", "Gd3+")
        self.assertEqual(response.configuration, expected["configuration"])
        self.assertEqual(response.term_symbol, expected["term_symbol"])
        self.assertEqual(response.unpaired_electrons,
                         expected["unpaired_electrons"])
        self.assertEqual(response.configuration, "[Xe] 4f7")
        self.assertEqual(response.unpaired_electrons, 7)

    def test_whole_description_matches_the_cli_json(self):
        from google.protobuf import json_format
        for args in (["Fe3+"], ["Co3+", "--geometry", "octahedral",
                                "--spin-state", "low"]):
            request = pb.DescribeAtomRequest(spec=args[0])
            if len(args) > 1:
                request.geometry = pb.GEOMETRY_OCTAHEDRAL
                request.spin_state = pb.SPIN_STATE_LOW
            response = self.stub.DescribeAtom(request, timeout=10)
            remote = json_format.MessageToDict(
                response, preserving_proto_field_name=True,
                including_default_value_fields=True)
            self.assertEqual(remote, self.cli_json("atom", *args), args)

    def test_bad_spec_is_invalid_argument(self):
        for spec in ("Xx", "Fe99+", ""):
            with self.assertRaises(grpc.RpcError) as raised:
                self.stub.DescribeAtom(pb.DescribeAtomRequest(spec=spec),
                                       timeout=10)
            self.assertEqual(raised.exception.code(),
                             grpc.StatusCode.INVALID_ARGUMENT, spec)
            self.assertIn("spec", raised.exception.details())

    def test_list_elements_returns_118(self):
        response = self.stub.ListElements(pb.ListElementsRequest(), timeout=10)
        self.assertEqual(len(response.elements), 118)
        self.assertEqual(response.elements[-1].symbol, "Og")

    def test_analyze_records_answers_each_batch_in_order(self):
        sizes = [3, 1, 0, 500]
        batches = []
        next_id = 0
        for size in sizes:
            batch = pb.RecordBatch()
            for _ in range(size):
                batch.records.add(id="py-%d" % next_id, formula="H2O")
                next_id += 1
            batches.append(batch)
        replies = list(self.stub.AnalyzeRecords(iter(batches), timeout=10))
        self.assertEqual([len(r.reports) for r in replies], sizes)
        ids = [report.id for reply in replies for report in reply.reports]
        self.assertEqual(ids, ["py-%d" % i for i in range(next_id)])
        # Water balances as H+ and O2- (common practice, no source).
        self.assertTrue(all(report.valid for reply in replies
                            for report in reply.reports))

    def test_analyze_compound_matches_the_cli(self):
        report = self.stub.AnalyzeCompound(
            pb.CompositionRecord(id="x", formula="Fe3O4"), timeout=10)
        cli = self.cli_json("compound", "Fe3O4")
        self.assertTrue(report.valid)
        self.assertEqual(report.unpaired_per_formula_unit,
                         cli["unpaired_per_formula_unit"])
        self.assertEqual([(s.element, s.state) for s in report.oxidation_states],
                         [(s["element"], s["state"])
                          for s in cli["oxidation_states"]])
        bad = self.stub.AnalyzeCompound(
            pb.CompositionRecord(id="y", formula="Fe2O3)"), timeout=10)
        self.assertFalse(bad.valid)
        self.assertEqual(bad.diagnostics[0].code, "malformed_formula")
        self.assertEqual(bad.diagnostics[0].column, 6)

    def test_reflection_lists_the_services(self):
        # ServerReflectionRequest{list_services: ""}, hand-encoded (field 7,
        # length 0), so no reflection stubs are needed.
        call = self.channel.stream_stream(
            "/grpc.reflection.v1alpha.ServerReflection/ServerReflectionInfo",
            request_serializer=None, response_deserializer=None)
        replies = list(call(iter([b"\x3a\x00"]), timeout=10))
        self.assertEqual(len(replies), 1)
        self.assertIn(SERVICE.encode(), replies[0])
        self.assertIn(b"grpc.health.v1.Health", replies[0])

    def test_sigterm_exits_zero(self):
        self.stub.DescribeAtom(pb.DescribeAtomRequest(spec="Fe"), timeout=10)
        self.assertEqual(self.stop_server(), 0)
        with open(os.path.join(self.log_dir, "stderr"), "rb") as log:
            self.assertIn(b"call method=DescribeAtom code=OK", log.read())


if __name__ == "__main__":
    unittest.main(verbosity=2)
