namespace TaskPhrase.Embedding;

/// <summary>
/// How a tokenizer split a text: the basis of the unintelligible guard. Text the model knows splits
/// into whole-word pieces; keyboard mash and pseudo-words split into many short fragments or unknown tokens.
/// </summary>
/// <param name="Words">Pre-tokenised words (including punctuation marks).</param>
/// <param name="AlphabeticWords">Words made of letters only.</param>
/// <param name="Pieces">Word pieces, special tokens excluded.</param>
/// <param name="UnknownPieces">Pieces the vocabulary does not know (<c>[UNK]</c>).</param>
/// <param name="FragmentedWords">Alphabetic words that split into two or more pieces.</param>
/// <param name="WholeWords">Alphabetic words of three or more letters found whole in the vocabulary.</param>
public readonly record struct SubwordStatistics(int Words, int AlphabeticWords, int Pieces, int UnknownPieces, int FragmentedWords, int WholeWords);
