// Writes soundex-reference.tsv: every distinct ASCII word of the CLINC150 training and validation queries
// (Larson et al., 2019; CC BY 3.0) with its American Soundex code from the independent npm package
// soundex-code 2.0.1 (wooorm, MIT). SoundexTests compares TaskPhrase's Soundex with every row.
// Run:  npm install soundex-code@2.0.1 && node make_fixture.mjs ../../../../shared/datasets/clinc150/clinc150_train_val.json
import { readFileSync, writeFileSync } from 'node:fs'
import { soundex } from 'soundex-code'

const data = JSON.parse(readFileSync(process.argv[2], 'utf8'))
const words = new Set()
for (const split of ['train', 'val', 'oos_train', 'oos_val'])
  for (const [text] of data[split])
    for (const w of text.toLowerCase().match(/[a-z]+/g) ?? []) words.add(w)
const rows = [...words].sort().map(w => `${w}\t${soundex(w)}`)
writeFileSync('soundex-reference.tsv', '# word\tsoundex (soundex-code 2.0.1)\n' + rows.join('\n') + '\n')
console.log(`${rows.length} words`)
