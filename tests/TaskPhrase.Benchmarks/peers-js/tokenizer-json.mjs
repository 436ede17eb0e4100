// Builds the Hugging Face tokenizers JSON description of an uncased BERT WordPiece tokeniser from a vocab.txt,
// so that transformers.js can tokenise with the very vocabulary TaskPhrase bundles (the bundled model folder has
// no tokenizer.json). The layout follows the tokenizers library's serialisation of a BERT tokenizer
// (common practice): BertNormalizer, BertPreTokenizer, TemplateProcessing "[CLS] $A [SEP]", WordPiece model with
// "##" continuation prefix, "[UNK]" and at most 100 characters per word, WordPiece decoder.

/**
 * Splits vocab.txt text into tokens, one per line; the id of a token is its line number from 0.
 * @param {string} text the file's contents
 * @returns {string[]}
 */
export function vocabularyLines(text) {
  const lines = text.split(/\r?\n/);
  if (lines.length > 0 && lines[lines.length - 1] === '') lines.pop();
  return lines;
}

/**
 * The tokenizer.json object for an uncased (or cased) BERT WordPiece vocabulary.
 * @param {string[]} vocab tokens in id order
 * @param {{ lowercase?: boolean, maxInputCharsPerWord?: number, source?: string }} [options]
 */
export function bertTokenizerJson(vocab, { lowercase = true, maxInputCharsPerWord = 100, source = 'vocab.txt' } = {}) {
  const ids = new Map();
  vocab.forEach((token, id) => {
    if (!ids.has(token)) ids.set(token, id);
  });
  const idOf = (token) => {
    const id = ids.get(token);
    if (id === undefined) {
      throw new Error(`${source}: the vocabulary has no ${token} token; a BERT vocab.txt needs [PAD], [UNK], [CLS], [SEP] and [MASK].`);
    }
    return id;
  };
  const special = ['[PAD]', '[UNK]', '[CLS]', '[SEP]', '[MASK]'];
  const cls = idOf('[CLS]');
  const sep = idOf('[SEP]');
  return {
    version: '1.0',
    truncation: null,
    padding: null,
    added_tokens: special.map((content) => ({
      id: idOf(content),
      content,
      single_word: false,
      lstrip: false,
      rstrip: false,
      normalized: false,
      special: true,
    })),
    normalizer: {
      type: 'BertNormalizer',
      clean_text: true,
      handle_chinese_chars: true,
      strip_accents: null,
      lowercase,
    },
    pre_tokenizer: { type: 'BertPreTokenizer' },
    post_processor: {
      type: 'TemplateProcessing',
      single: [
        { SpecialToken: { id: '[CLS]', type_id: 0 } },
        { Sequence: { id: 'A', type_id: 0 } },
        { SpecialToken: { id: '[SEP]', type_id: 0 } },
      ],
      pair: [
        { SpecialToken: { id: '[CLS]', type_id: 0 } },
        { Sequence: { id: 'A', type_id: 0 } },
        { SpecialToken: { id: '[SEP]', type_id: 0 } },
        { Sequence: { id: 'B', type_id: 1 } },
        { SpecialToken: { id: '[SEP]', type_id: 1 } },
      ],
      special_tokens: {
        '[CLS]': { id: '[CLS]', ids: [cls], tokens: ['[CLS]'] },
        '[SEP]': { id: '[SEP]', ids: [sep], tokens: ['[SEP]'] },
      },
    },
    decoder: { type: 'WordPiece', prefix: '##', cleanup: true },
    model: {
      type: 'WordPiece',
      unk_token: '[UNK]',
      continuing_subword_prefix: '##',
      max_input_chars_per_word: maxInputCharsPerWord,
      vocab: Object.fromEntries(ids),
    },
  };
}

/**
 * The tokenizer_config.json that goes with it (transformers.js reads the class and special tokens from here).
 * @param {{ lowercase?: boolean, maxLength?: number }} [options]
 */
export function bertTokenizerConfig({ lowercase = true, maxLength = 256 } = {}) {
  return {
    tokenizer_class: 'BertTokenizer',
    do_lower_case: lowercase,
    tokenize_chinese_chars: true,
    strip_accents: null,
    model_max_length: maxLength,
    clean_up_tokenization_spaces: true,
    unk_token: '[UNK]',
    sep_token: '[SEP]',
    pad_token: '[PAD]',
    cls_token: '[CLS]',
    mask_token: '[MASK]',
  };
}
