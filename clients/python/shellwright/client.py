"""A shellwrightd server, with the in-process calls' signatures and
answers.

    with shellwright.Client("lims-host:50051", tls_ca="ca.pem",
                            token_file="token") as client:
        client.describe("Fe3+")
        client.analyze("LiFePO4", id="s1")
        for report in client.analyze_many(records): ...

Requests are checked and built, and answers turned into dicts, by the
same code as in process (shellwright._engine), so the dicts are equal.
"""

import collections
import queue

from shellwright import _engine

_BATCH = 500  # Records per RecordBatch, as the CLI sends them.


def _read(path, what):
    if path is None:
        return None
    try:
        with open(path, "rb") as f:
            return f.read()
    except OSError as e:
        raise ValueError(f"{what}: cannot read {path!r}: {e.strerror}") from e


class Client:
    """A connection to shellwrightd at `target` ("host:port").

    tls_ca: PEM file of the roots that sign the server's certificate
        (enables TLS); tls_cert, tls_key: a client certificate and key for
        mutual TLS. token_file: a file holding the bearer token the server
        asks for. timeout: seconds per call (per stream for analyze_many);
        None waits without limit.

    Errors: ValueError for a request the server rejects (its message),
    ConnectionError when the server cannot be reached or the connection
    drops (never a partial silent result), PermissionError for a refused
    token or certificate, RuntimeError otherwise.
    """

    def __init__(self, target, *, tls_ca=None, tls_cert=None, tls_key=None,
                 token_file=None, timeout=None):
        import grpc
        from shellwright.v1 import electron_structure_pb2 as pb
        from shellwright.v1 import electron_structure_pb2_grpc as pb_grpc

        self._grpc, self._pb = grpc, pb
        self.target = target
        self.timeout = timeout
        if (tls_cert is None) != (tls_key is None):
            raise ValueError("tls_cert and tls_key: give both or neither")
        if tls_ca is not None or tls_cert is not None:
            credentials = grpc.ssl_channel_credentials(
                root_certificates=_read(tls_ca, "tls_ca"),
                private_key=_read(tls_key, "tls_key"),
                certificate_chain=_read(tls_cert, "tls_cert"))
            self._channel = grpc.secure_channel(target, credentials)
        else:
            self._channel = grpc.insecure_channel(target)
        self._metadata = ()
        if token_file is not None:
            token = _read(token_file, "token_file").decode("utf-8").strip()
            if not token:
                raise ValueError(f"token_file: {token_file!r} is empty")
            self._metadata = (("authorization", "Bearer " + token),)
        self._stub = pb_grpc.ElectronStructureStub(self._channel)

    def close(self):
        self._channel.close()

    def __enter__(self):
        return self

    def __exit__(self, *exc):
        self.close()

    def _error(self, e):
        code = e.code() if hasattr(e, "code") else None
        details = e.details() if hasattr(e, "details") else str(e)
        StatusCode = self._grpc.StatusCode
        if code == StatusCode.INVALID_ARGUMENT:
            return ValueError(details)
        text = f"{self.target}: {code.name if code else 'error'}: {details}"
        if code in (StatusCode.UNAVAILABLE, StatusCode.DEADLINE_EXCEEDED,
                    StatusCode.CANCELLED, StatusCode.ABORTED):
            return ConnectionError(text)
        if code in (StatusCode.UNAUTHENTICATED, StatusCode.PERMISSION_DENIED):
            return PermissionError(text)
        return RuntimeError(text)

    def _call(self, method, request):
        try:
            return method(request, timeout=self.timeout,
                          metadata=self._metadata)
        except self._grpc.RpcError as e:
            raise self._error(e) from None

    def describe(self, spec, *, charge=None, geometry=None, spin_state=None,
                 configuration=None):
        """shellwright.describe, answered by the server."""
        request = self._pb.DescribeAtomRequest.FromString(
            _engine.describe_request(spec, charge, geometry, spin_state,
                                     configuration))
        answer = self._call(self._stub.DescribeAtom, request)
        return _engine.atom_dict(answer.SerializeToString())

    def analyze(self, formula, **record_fields):
        """shellwright.analyze, answered by the server."""
        request = self._pb.CompositionRecord.FromString(
            _engine.record_bytes(formula, record_fields))
        answer = self._call(self._stub.AnalyzeCompound, request)
        return _engine.report_dict(answer.SerializeToString())

    def analyze_many(self, records, *, alternatives=0, batch_size=_BATCH):
        """shellwright.analyze_many over one AnalyzeRecords stream, in
        batches of `batch_size` records: one report per record, in input
        order. Raises ConnectionError if the stream ends before every
        record sent has its report."""
        if not 1 <= batch_size <= _engine.MAX_RECORDS_PER_BATCH:
            raise ValueError(f"batch_size: must be 1.."
                             f"{_engine.MAX_RECORDS_PER_BATCH}")
        if not 0 <= alternatives <= _engine.MAX_ALTERNATIVES:
            raise ValueError(f"alternatives: must be 0.."
                             f"{_engine.MAX_ALTERNATIVES}")
        return self._analyze_many(iter(records), alternatives, batch_size)

    def _analyze_many(self, items, alternatives, batch_size):
        outgoing = queue.Queue()
        # Batches sent, each with its malformed reports by position and
        # the number of reports the server owes for it.
        pending = collections.deque()

        def requests():
            while True:
                batch = outgoing.get()
                if batch is None:
                    return
                yield batch

        stream = self._stub.AnalyzeRecords(requests(), timeout=self.timeout,
                                           metadata=self._metadata)
        row = 0
        exhausted = False
        try:
            while True:
                # Keep two batches in flight: the server answers one while
                # the next travels.
                while not exhausted and len(pending) < 2:
                    chunk = []
                    for item in items:
                        chunk.append(item)
                        if len(chunk) == batch_size:
                            break
                    if not chunk:
                        exhausted = True
                        outgoing.put(None)
                        break
                    data, malformed = _engine.record_batch(chunk, row + 1,
                                                           alternatives)
                    row += len(chunk)
                    sent = len(chunk) - len(malformed)
                    if sent:
                        outgoing.put(self._pb.RecordBatch.FromString(data))
                    pending.append((len(chunk), dict(malformed), sent))
                if not pending:
                    return
                size, malformed, owed = pending.popleft()
                reports = []
                while len(reports) < owed:
                    answer = next(stream, None)
                    if answer is None:
                        raise ConnectionError(
                            f"{self.target}: the AnalyzeRecords stream "
                            f"ended with {owed - len(reports)} of {owed} "
                            f"reports of a batch missing")
                    reports.extend(_engine.report_batch_dicts(
                        answer.SerializeToString()))
                answers = iter(reports)
                for i in range(size):
                    yield malformed[i] if i in malformed else next(answers)
        except self._grpc.RpcError as e:
            raise self._error(e) from None
        finally:
            if not exhausted:
                outgoing.put(None)
                stream.cancel()
