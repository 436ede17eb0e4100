// transformers.js peer for the TaskPhrase benchmark harness (`TaskPhrase.Benchmarks peers-js`): a long-lived child
// process driven over stdin/stdout, one command per line, one answer line per command.
//
//   embed TEXT  -> ok [v0, v1, ...]           the pooled, normalised embedding (feature-extraction pipeline)
//   ids TEXT    -> ok [101, ..., 102]         the token ids of TEXT (for the tokeniser agreement check)
//   run N       -> ok d1 d2 ... dN            N timed embeddings of the fixed --command, nanoseconds each
//                                             (process.hrtime.bigint around one awaited pipeline call)
//   cpu         -> ok USER_US SYSTEM_US       process CPU time so far (process.cpuUsage), microseconds
//   mem         -> ok {json}                  peak and current RSS from /proc/self/status, process.memoryUsage()
//   info        -> ok {json}                  versions and the session options that were passed
//   quit        -> ok bye                     then exits
// Errors answer `error MESSAGE` on the same line and the process keeps going.
//
// Usage: node peer.mjs --model-dir DIR [--command TEXT] [--threads 2] [--spin] [--scratch DIR]
// DIR holds the bundled model.onnx, vocab.txt and model.json. A transformers.js model folder is laid out in the
// scratch dir (default: the system temp folder); nothing is downloaded (env.allowRemoteModels = false).

import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import readline from 'node:readline';
import { bertTokenizerConfig, bertTokenizerJson, vocabularyLines } from './tokenizer-json.mjs';

const args = parseArguments(process.argv.slice(2));
const modelDir = path.resolve(args['model-dir'] ?? fail('--model-dir DIR is required (the folder with model.onnx, vocab.txt, model.json).'));
const command = args.command ?? 'please could you water the basil on the windowsill';
const threads = Number.parseInt(args.threads ?? '2', 10);
if (!(threads >= 1)) fail(`--threads needs a whole number >= 1, got '${args.threads}'.`);
const spin = args.spin === true;
const scratch = path.resolve(args.scratch ?? path.join(os.tmpdir(), 'taskphrase-peers-js'));

const modelId = layOutModel(modelDir, scratch);

const transformers = await import('@huggingface/transformers');
const { env, pipeline } = transformers;
env.allowRemoteModels = false;
env.allowLocalModels = true;
env.localModelPath = scratch + path.sep;
env.useFSCache = false;

// The options TaskPhrase's own session is made with (OnnxEmbedder: all graph optimisations, sequential, the given
// intra-op threads, one inter-op thread, spinning off unless asked). onnxruntime-node passes `extra` on as session
// config entries (flattened with dots), which is how spinning is set.
const sessionOptions = {
  graphOptimizationLevel: 'all',
  executionMode: 'sequential',
  intraOpNumThreads: threads,
  interOpNumThreads: 1,
  extra: { session: { intra_op: { allow_spinning: spin ? '1' : '0' } } },
};
const extractor = await pipeline('feature-extraction', modelId, {
  device: 'cpu',
  dtype: 'fp32',
  local_files_only: true,
  session_options: sessionOptions,
});

async function embed(text) {
  const output = await extractor(text, { pooling: 'mean', normalize: true });
  return output.data;
}

const handlers = {
  async embed(text) {
    return JSON.stringify(Array.from(await embed(text)));
  },
  async ids(text) {
    const encoded = extractor.tokenizer(text);
    return JSON.stringify(Array.from(encoded.input_ids.data, (v) => Number(v)));
  },
  async run(text) {
    const n = Number.parseInt(text, 10);
    if (!(n >= 1)) throw new Error(`run needs a whole number >= 1, got '${text}'.`);
    const durations = new Array(n);
    for (let i = 0; i < n; i++) {
      const start = process.hrtime.bigint();
      await embed(command);
      durations[i] = process.hrtime.bigint() - start;
    }
    return durations.join(' ');
  },
  async cpu() {
    const usage = process.cpuUsage();
    return `${usage.user} ${usage.system}`;
  },
  async mem() {
    const status = fs.readFileSync('/proc/self/status', 'utf8');
    const kib = (key) => {
      const match = status.match(new RegExp(`^${key}:\\s+(\\d+) kB`, 'm'));
      return match ? Number(match[1]) : null;
    };
    return JSON.stringify({ vmHwmKiB: kib('VmHWM'), vmRssKiB: kib('VmRSS'), ...process.memoryUsage() });
  },
  async info() {
    const ortVersion = readPackageVersion('onnxruntime-node');
    return JSON.stringify({
      node: process.version,
      transformers: env.version,
      onnxruntimeNode: ortVersion,
      command,
      modelFolder: path.join(scratch, modelId),
      sessionOptions,
    });
  },
};

const input = readline.createInterface({ input: process.stdin, crlfDelay: Infinity });
process.stdout.write('ready\n');
for await (const line of input) {
  const space = line.indexOf(' ');
  const name = space < 0 ? line.trim() : line.slice(0, space);
  const rest = space < 0 ? '' : line.slice(space + 1);
  if (name === 'quit') {
    process.stdout.write('ok bye\n');
    break;
  }
  const handler = Object.hasOwn(handlers, name) ? handlers[name] : null;
  if (handler === null) {
    process.stdout.write(`error unknown command '${name}'; known: ${[...Object.keys(handlers), 'quit'].join(', ')}\n`);
    continue;
  }
  try {
    process.stdout.write(`ok ${await handler(rest)}\n`);
  } catch (error) {
    process.stdout.write(`error ${String(error?.message ?? error).replace(/\s+/g, ' ')}\n`);
  }
}
input.close();
process.exit(0);

// Writes config.json, tokenizer.json, tokenizer_config.json and onnx/model.onnx (a symbolic link to the bundled
// file) under scratch/<model id>/, and returns the model id.
function layOutModel(source, root) {
  const card = JSON.parse(readOrFail(path.join(source, 'model.json')));
  const vocab = vocabularyLines(readOrFail(path.join(source, 'vocab.txt')));
  const onnx = path.join(source, 'model.onnx');
  if (!fs.existsSync(onnx)) fail(`${onnx} is missing; build the solution first (the model is extracted at build time).`);
  const id = card.id ?? path.basename(source);
  const target = path.join(root, id);
  fs.mkdirSync(path.join(target, 'onnx'), { recursive: true });
  const lowercase = card.lowercase !== false;
  const config = {
    architectures: ['BertModel'],
    model_type: 'bert',
    hidden_size: card.dimensions,
    vocab_size: vocab.length,
    pad_token_id: vocab.indexOf('[PAD]'),
  };
  fs.writeFileSync(path.join(target, 'config.json'), JSON.stringify(config, null, 2));
  fs.writeFileSync(path.join(target, 'tokenizer.json'), JSON.stringify(bertTokenizerJson(vocab, { lowercase, source: path.join(source, 'vocab.txt') })));
  fs.writeFileSync(path.join(target, 'tokenizer_config.json'), JSON.stringify(bertTokenizerConfig({ lowercase, maxLength: card.max_tokens ?? 256 }), null, 2));
  const link = path.join(target, 'onnx', 'model.onnx');
  fs.rmSync(link, { force: true });
  fs.symlinkSync(onnx, link);
  return id;
}

function readOrFail(file) {
  try {
    return fs.readFileSync(file, 'utf8');
  } catch (error) {
    fail(`cannot read ${file} (${error.code ?? error.message}); pass --model-dir the bundled model folder after a build.`);
  }
}

function readPackageVersion(name) {
  const file = path.join(path.dirname(new URL(import.meta.url).pathname), 'node_modules', name, 'package.json');
  try {
    return JSON.parse(fs.readFileSync(file, 'utf8')).version;
  } catch {
    return null;
  }
}

function parseArguments(list) {
  const known = ['model-dir', 'command', 'threads', 'spin', 'scratch'];
  const result = {};
  for (let i = 0; i < list.length; i++) {
    const a = list[i];
    if (!a.startsWith('--') || !known.includes(a.slice(2))) fail(`unknown argument '${a}'; known: ${known.map((k) => '--' + k).join(', ')}`);
    const hasValue = i + 1 < list.length && !list[i + 1].startsWith('--');
    result[a.slice(2)] = hasValue ? list[++i] : true;
  }
  return result;
}

function fail(message) {
  process.stderr.write(`peer.mjs: ${message}\n`);
  process.exit(2);
}
