"""Calls a sliceplan coordinator from Python: mutual TLS, a bearer token,
the query file as the request, and the plan printed with its join types.

    python3 clients/python/optimize.py COORDINATOR QUERY.json CERT_DIR [SECONDS]

CERT_DIR holds ca.pem, client.pem, client.key and tokens (one token per
line), as deploy/make-certs writes them (.local-cluster/certs for
deploy/local-cluster). SECONDS (default 10) is the request's deadline: the
best plan found by then comes back, marked not proven optimal, never a
time error. Needs Debian's python3-grpcio, and protoc with
grpc_python_plugin (protobuf-compiler, protobuf-compiler-grpc): the stubs
are generated from proto/ at start.
"""
import os
import shutil
import subprocess
import sys
import tempfile

try:
    import grpc  # noqa: F401
except ImportError:
    # Debian's python3-grpcio is for Debian's own python3; another python3
    # first on PATH (a pyenv, a venv) lacks it.
    if os.path.exists("/usr/bin/python3") and sys.executable != "/usr/bin/python3":
        os.execv("/usr/bin/python3", ["/usr/bin/python3"] + sys.argv)
    raise

PROTO_DIR = os.path.join(os.path.dirname(os.path.abspath(__file__)), "..", "..", "proto")


def load_stubs():
    out = tempfile.mkdtemp(prefix="sliceplan-stubs-")
    # Debian's protoc and plugin first, matching Debian's python3-protobuf.
    protoc = "/usr/bin/protoc" if os.path.exists("/usr/bin/protoc") else "protoc"
    plugin = "/usr/bin/grpc_python_plugin"
    if not os.path.exists(plugin):
        plugin = shutil.which("grpc_python_plugin") or plugin
    if subprocess.run([protoc, "-I" + PROTO_DIR, "--python_out=" + out,
                       "--grpc_python_out=" + out, "--plugin=protoc-gen-grpc_python=" + plugin,
                       PROTO_DIR + "/query.proto", PROTO_DIR + "/sliceplan.proto"]).returncode != 0:
        sys.exit("protoc failed on " + PROTO_DIR)
    sys.path.insert(0, out)


def main():
    if len(sys.argv) not in (4, 5):
        sys.exit(__doc__)
    address, query_path, certs = sys.argv[1:4]
    seconds = float(sys.argv[4]) if len(sys.argv) == 5 else 10.0
    load_stubs()
    import grpc
    from google.protobuf import json_format
    import query_pb2
    import sliceplan_pb2
    import sliceplan_pb2_grpc

    def read(name):
        with open(os.path.join(certs, name), "rb") as f:
            return f.read()

    with open(query_path) as f:
        query = json_format.Parse(f.read(), query_pb2.Query())
    # deadline_seconds with partial_on_deadline: the best plan by then; the
    # call's own deadline a little later covers the network
    # (docs/interfaces.md, "Time controls").
    request = sliceplan_pb2.OptimizeRequest(query=query, deadline_seconds=seconds,
                                            partial_on_deadline=True)
    token = [t for t in read("tokens").decode().split() if not t.startswith("#")][0]
    credentials = grpc.ssl_channel_credentials(read("ca.pem"), read("client.key"),
                                               read("client.pem"))
    with grpc.secure_channel(address, credentials) as channel:
        stub = sliceplan_pb2_grpc.CoordinatorStub(channel)
        try:
            response = stub.Optimize(request, timeout=seconds + 5,
                                     metadata=(("authorization", "Bearer " + token),))
        except grpc.RpcError as e:
            sys.exit("sliceplan: %s: %s" % (e.code().name, e.details()))

    names = [r.name for r in query.relations]
    nodes = response.plan.nodes
    keyword = {sliceplan_pb2.JOIN_KIND_LEFT: " LEFT", sliceplan_pb2.JOIN_KIND_FULL: " FULL",
               sliceplan_pb2.JOIN_KIND_SEMI: " SEMI", sliceplan_pb2.JOIN_KIND_ANTI: " ANTI"}

    def tree(i):
        node = nodes[i]
        if node.WhichOneof("kind") == "relation":
            return names[node.relation]
        join = node.join
        return "(%s%s %s)" % (tree(join.left), keyword.get(join.kind, ""), tree(join.right))

    root = nodes[-1]
    print(tree(len(nodes) - 1))
    print("cout %.6g, %d nodes, %s" % (root.costs["cout"], len(nodes),
                                       "proven optimal" if response.proven_optimal
                                       else "not proven optimal"))


if __name__ == "__main__":
    main()
