// Checks of the generated tokenizer.json, through transformers.js's own BertTokenizer, against published worked
// examples for the uncased BERT vocabulary (the vocab.txt TaskPhrase bundles is the bert-base-uncased one).
// Run with `npm test` in this folder after `npm ci` and a build (the build extracts vocab.txt); not part of CI.
// The harness (`peers-js`) checks the same generator against TaskPhrase's tokenizer on 1,000 CLINC150 queries.
import assert from 'node:assert/strict';
import fs from 'node:fs';
import path from 'node:path';
import { test } from 'node:test';
import { fileURLToPath } from 'node:url';
import { BertTokenizer } from '@huggingface/transformers';
import { bertTokenizerConfig, bertTokenizerJson, vocabularyLines } from './tokenizer-json.mjs';

const here = path.dirname(fileURLToPath(import.meta.url));
const vocabPath = path.resolve(here, '..', '..', '..', 'models', 'all-minilm-l6-v2', 'vocab.txt');
const missing = fs.existsSync(vocabPath) ? false : `${vocabPath} is missing; build the solution first (the model is extracted at build time)`;
const vocab = missing ? [] : vocabularyLines(fs.readFileSync(vocabPath, 'utf8'));
const tokenizer = missing ? null : new BertTokenizer(bertTokenizerJson(vocab), bertTokenizerConfig());

test('word pieces of the BERT README example (google-research/bert README, "John Johanson\'s house", from memory)', { skip: missing }, () => {
  assert.deepEqual(tokenizer.tokenize("John Johanson's house"), ['john', 'johan', '##son', "'", 's', 'house']);
});

test('ids of the Hugging Face BertModel docs example "Hello, my dog is cute" (bert-base-uncased, from memory)', { skip: missing }, () => {
  const ids = Array.from(tokenizer('Hello, my dog is cute').input_ids.data, Number);
  assert.deepEqual(ids, [101, 7592, 1010, 2026, 3899, 2003, 10140, 102]);
});

test('uncased BERT strips accents and drops control characters (BERT BasicTokenizer, common practice)', { skip: missing }, () => {
  assert.deepEqual(tokenizer.tokenize('Héllo\u0000 WÖRLD\tnaïve'), ['hello', 'world', 'naive']);
});

test('a word longer than 100 characters becomes [UNK], one of 100 does not (WordPiece max_input_chars_per_word, common practice)', { skip: missing }, () => {
  assert.deepEqual(tokenizer.tokenize('x'.repeat(101)), ['[UNK]']);
  assert.notDeepEqual(tokenizer.tokenize('x'.repeat(100)), ['[UNK]']);
});

test('every vocabulary line keeps its line number as id', { skip: missing }, () => {
  const model = bertTokenizerJson(vocab).model.vocab;
  assert.equal(Object.keys(model).length, vocab.length);
  vocab.forEach((token, id) => assert.equal(model[token], id, token));
});

test('a vocabulary without [UNK] is refused with the file named', () => {
  assert.throws(() => bertTokenizerJson(['[PAD]', '[CLS]', '[SEP]', '[MASK]', 'a'], { source: 'x/vocab.txt' }), /x\/vocab\.txt: the vocabulary has no \[UNK\]/);
});
