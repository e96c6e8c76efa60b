"""The foreign-client check: a client that is not ours (Debian's
python3-grpcio, stubs generated from proto/ at test time by Debian's protoc
and grpc_python_plugin) calls the coordinator and prints the plan tree it
gets back.

usage: foreign_client.py COORDINATOR_ADDRESS PROTO_DIR QUERY.json SLICES
           [CA.pem CLIENT.pem CLIENT.key TOKENS]
With the last four it speaks mutual TLS and sends the first bearer token.
"""
import os
import shutil
import subprocess
import sys
import tempfile


def main():
    address, proto_dir, query_path, slices = sys.argv[1:5]
    secure = sys.argv[5:9]
    out = tempfile.mkdtemp(prefix="sliceplan-stubs-")
    # Debian's protoc and plugin first, matching Debian's python3-protobuf.
    protoc = "/usr/bin/protoc" if os.path.exists("/usr/bin/protoc") else "protoc"
    plugin = "/usr/bin/grpc_python_plugin"
    if not os.path.exists(plugin):
        plugin = shutil.which("grpc_python_plugin") or plugin
    status = subprocess.run([protoc, "-I" + proto_dir, "--python_out=" + out,
                             "--grpc_python_out=" + out,
                             "--plugin=protoc-gen-grpc_python=" + plugin,
                             proto_dir + "/query.proto", proto_dir + "/sliceplan.proto"])
    if status.returncode != 0:
        sys.exit("protoc failed")
    sys.path.insert(0, out)
    import grpc
    from google.protobuf import json_format
    import query_pb2
    import sliceplan_pb2
    import sliceplan_pb2_grpc

    with open(query_path) as f:
        query = json_format.Parse(f.read(), query_pb2.Query())
    request = sliceplan_pb2.OptimizeRequest(query=query, slice_count=int(slices))
    metadata = ()
    if secure:
        ca, cert, key, tokens = (open(p, "rb").read() for p in secure)
        credentials = grpc.ssl_channel_credentials(ca, key, cert)
        channel = grpc.secure_channel(address, credentials)
        token = [t for t in tokens.decode().split() if t and not t.startswith("#")][0]
        # The scheme in lower case: auth schemes are case-insensitive
        # (RFC 7235, section 2.1), and the coordinator must take it so.
        metadata = (("authorization", "bearer " + token),)
    else:
        channel = grpc.insecure_channel(address)
    with channel:
        stub = sliceplan_pb2_grpc.CoordinatorStub(channel)
        response = stub.Optimize(request, timeout=60, metadata=metadata)
    nodes = response.plan.nodes
    names = [r.name for r in query.relations]

    def tree(i):
        node = nodes[i]
        if node.WhichOneof("kind") == "relation":
            return names[node.relation]
        return "(%s %s)" % (tree(node.join.left), tree(node.join.right))

    print(tree(len(nodes) - 1))
    print("%.17g" % nodes[-1].costs["cout"])


if __name__ == "__main__":
    main()
