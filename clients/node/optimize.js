// Calls a sliceplan coordinator from Node: mutual TLS, a bearer token,
// the query file as the request, and the plan printed with its join types.
//
//   node clients/node/optimize.js COORDINATOR QUERY.json CERT_DIR [SECONDS]
//
// CERT_DIR holds ca.pem, client.pem, client.key and tokens (one token per
// line), as deploy/make-certs writes them (.local-cluster/certs for
// deploy/local-cluster). SECONDS (default 10) is the request's deadline:
// the best plan found by then comes back, marked not proven optimal, never
// a time error. Needs `npm ci` in clients/node (@grpc/grpc-js,
// @grpc/proto-loader and protobufjs); the schema is read from proto/ at
// start, and the query file's keys are checked against it.
'use strict';

const fs = require('fs');
const path = require('path');
const grpc = require('@grpc/grpc-js');
const protoLoader = require('@grpc/proto-loader');
const protobuf = require('protobufjs');

const PROTO_DIR = path.join(__dirname, '..', '..', 'proto');
const KEYWORD = {JOIN_KIND_LEFT: ' LEFT', JOIN_KIND_FULL: ' FULL', JOIN_KIND_SEMI: ' SEMI',
                 JOIN_KIND_ANTI: ' ANTI'};

// The query file's keys checked against the schema, as the C++ reader
// checks them: a field's proto name or its JSON name (rowBytes), renamed
// to the proto name the loader sends; anything else is refused by name
// (the loader would drop it without a word and send a different query).
function checkKeys(obj, type, at) {
  const camel = (name) => name.replace(/_([a-z])/g, (_, c) => c.toUpperCase());
  for (const key of Object.keys(obj)) {
    const field = type.fields[key] || type.fieldsArray.find((f) => camel(f.name) === key);
    if (!field) throw new Error(`${at}${key}: not a field of ${type.name}`);
    if (field.name !== key) {
      if (field.name in obj) throw new Error(`${at}${field.name}: given twice`);
      obj[field.name] = obj[key];
      delete obj[key];
    }
    field.resolve();
    if (!(field.resolvedType instanceof protobuf.Type)) continue;
    const values = field.repeated ? obj[field.name] : [obj[field.name]];
    if (!Array.isArray(values)) continue;
    values.forEach((v, i) => {
      if (v && typeof v === 'object' && !Array.isArray(v)) {
        checkKeys(v, field.resolvedType, `${at}${field.name}${field.repeated ? `[${i}]` : ''}.`);
      }
    });
  }
}

function main(argv) {
  if (argv.length < 3 || argv.length > 4) {
    console.error('usage: node optimize.js COORDINATOR QUERY.json CERT_DIR [SECONDS]');
    process.exit(2);
  }
  const [address, queryPath, certs] = argv;
  const seconds = argv.length === 4 ? Number(argv[3]) : 10;
  const definition = protoLoader.loadSync(path.join(PROTO_DIR, 'sliceplan.proto'), {
    includeDirs: [PROTO_DIR], keepCase: true, enums: String, longs: Number, oneofs: true,
    defaults: true,  // a join's left input 0 is a value, not an absent field
  });
  const v1 = grpc.loadPackageDefinition(definition).sliceplan.v1;
  const read = (name) => fs.readFileSync(path.join(certs, name));

  // The query file is the Query message in its JSON form: optional numbers
  // (rows, row_bytes, selectivity) are plain numbers, as in the file.
  const query = JSON.parse(fs.readFileSync(queryPath, 'utf8'));
  const root = new protobuf.Root();
  root.resolvePath = (origin, target) => path.join(PROTO_DIR, path.basename(target));
  root.loadSync('sliceplan.proto', {keepCase: true});
  try {
    checkKeys(query, root.lookupType('sliceplan.v1.Query'), '');
  } catch (e) {
    console.error(`sliceplan: ${queryPath}: ${e.message}`);
    process.exit(2);
  }
  // deadline_seconds with partial_on_deadline: the best plan by then; the
  // call's own deadline a little later covers the network
  // (docs/interfaces.md, "Time controls").
  const request = {query, deadline_seconds: seconds, partial_on_deadline: true};
  const token = read('tokens').toString().split(/\s+/).filter((t) => t && !t.startsWith('#'))[0];
  const credentials = grpc.credentials.createSsl(read('ca.pem'), read('client.key'),
                                                 read('client.pem'));
  // Node will not send an IP address as the TLS server name (RFC 6066):
  // for an address by IP, check the certificate for SLICEPLAN_TLS_NAME
  // (default localhost, which deploy/make-certs puts in every certificate).
  const host = address.replace(/:\d+$/, '').replace(/^\[|\]$/g, '');
  const ip = /^[\d.]+$/.test(host) || host.includes(':');
  const name = process.env.SLICEPLAN_TLS_NAME || 'localhost';
  const options = ip ? {'grpc.ssl_target_name_override': name} : {};
  const client = new v1.Coordinator(address, credentials, options);
  const metadata = new grpc.Metadata();
  metadata.set('authorization', 'Bearer ' + token);
  const deadline = new Date(Date.now() + (seconds + 5) * 1000);
  client.Optimize(request, metadata, {deadline}, (err, response) => {
    client.close();
    if (err) {
      console.error(`sliceplan: ${grpc.status[err.code]}: ${err.details}`);
      process.exit(1);
    }
    const names = query.relations.map((r) => r.name);
    const nodes = response.plan.nodes;
    const tree = (i) => {
      const node = nodes[i];
      if (node.kind === 'relation') return names[node.relation];
      const join = node.join;
      return `(${tree(join.left)}${KEYWORD[join.kind] || ''} ${tree(join.right)})`;
    };
    const root = nodes[nodes.length - 1];
    console.log(tree(nodes.length - 1));
    console.log(`cout ${Number(root.costs.cout).toPrecision(6)}, ${nodes.length} nodes, ` +
                (response.proven_optimal ? 'proven optimal' : 'not proven optimal'));
  });
}

main(process.argv.slice(2));
