#!/usr/bin/env bash
# Foreign-client check: a Python gRPC client with stubs generated from our
# .proto at test time gets the same plan from the coordinator as the CLI
# (over RPC and embedded), through the local cluster's mutual TLS and bearer
# token. Usage: foreign_client_test.sh BUILD_DIR SOURCE_DIR
set -u
build=$1
src=$2
python=/usr/bin/python3  # Debian's, which sees python3-grpcio
state=$(mktemp -d)
export SLICEPLAN_CLUSTER_DIR=$state SLICEPLAN_BUILD=$build
trap '"$src/deploy/local-cluster" stop >/dev/null; rm -rf "$state"' EXIT
"$src/deploy/local-cluster" start 2 >/dev/null || { echo "0 passed, 1 failed"; exit 1; }
addr=$(cat "$state/coordinator.addr")
certs=$state/certs
read -r -a cli_flags <"$state/cli.flags"
passed=0
failed=0
for q in tpch/q8 port_calls_small tpch/q5; do
  query=$src/examples/$q.json
  foreign=$("$python" "$src/tests/service/foreign_client.py" "$addr" "$src/proto" "$query" 4 \
              "$certs/ca.pem" "$certs/client.pem" "$certs/client.key" "$certs/tokens" | head -n 1)
  ours=$("$build/cli/sliceplan" optimize "$query" --coordinator="$addr" "${cli_flags[@]}" \
           --slices=4 --format=json |
         "$python" -c 'import json,sys; print(json.load(sys.stdin)["plans"][0]["tree"])')
  embedded=$("$build/cli/sliceplan" optimize "$query" --slices=4 --format=json |
             "$python" -c 'import json,sys; print(json.load(sys.stdin)["plans"][0]["tree"])')
  if [ -n "$foreign" ] && [ "$foreign" = "$ours" ] && [ "$ours" = "$embedded" ]; then
    passed=$((passed + 1))
  else
    failed=$((failed + 1))
    echo "FAIL $q: foreign '$foreign', cli rpc '$ours', embedded '$embedded'"
  fi
done
echo "$passed passed, $failed failed"
[ "$failed" -eq 0 ]
