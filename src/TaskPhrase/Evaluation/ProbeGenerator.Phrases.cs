using TaskPhrase.Registry;
using TaskPhrase.Text;

namespace TaskPhrase.Evaluation;

public static partial class ProbeGenerator
{
    /// <summary>
    /// An approved phrase taken apart by the heuristic of the class remarks. Spans are word indices, end exclusive;
    /// -1 when absent.
    /// </summary>
    internal sealed class Phrase
    {
        public Phrase(string taskId, string text)
        {
            TaskId = taskId;
            Text = text;
            Words = WordsOf(text);
            int n = Words.Length;
            int start = 0;
            while (start < n - 1 && ProbeLexicon.Politeness.Contains(Words[start])) start++;
            int end = n;
            if (end - 1 > start && Words[end - 1] == "please") end--;
            CoreStart = start;
            CoreEnd = end;
            if (n == 0) return;

            int verbEnd = start + 1;
            if (verbEnd + 1 < end && ProbeLexicon.Particles.Contains(Words[verbEnd]) && !ProbeLexicon.Prepositions.Contains(Words[verbEnd + 1]))
            {
                verbEnd++;
            }
            VerbEnd = verbEnd;

            // Object: after the first determiner that comes before any preposition, else the content run after the verb.
            int det = -1;
            for (int i = verbEnd; i < end; i++)
            {
                if (IsDeterminer(Words[i])) { det = i; break; }
                if (ProbeLexicon.Prepositions.Contains(Words[i])) break;
            }
            int head = det >= 0 ? det + 1 : verbEnd;
            int stop = RunEnd(head, end);
            if (stop > head)
            {
                ObjectStart = det >= 0 ? det : head;
                ObjectHeadStart = head;
                ObjectEnd = stop;
            }

            // Destination: the noun phrase after the last preposition of place or direction.
            for (int i = end - 2; i >= Math.Max(ObjectEnd, verbEnd); i--)
            {
                if (!ProbeLexicon.DestinationPrepositions.Contains(Words[i])) continue;
                int np = i + 1;
                int npHead = IsDeterminer(Words[np]) ? np + 1 : np;
                int npEnd = RunEnd(npHead, end);
                if (npEnd > npHead)
                {
                    DestinationStart = np;
                    DestinationEnd = npEnd;
                    break;
                }
            }

            // A possessive ("today's", "noor's") opens a noun phrase like a determiner; contractions do not.
            static bool IsDeterminer(string w) => ProbeLexicon.Determiners.Contains(w)
                || (w.Length > 3 && w.EndsWith("'s", StringComparison.Ordinal) && !ProbeLexicon.FunctionWords.Contains(w)
                    && w is not ("where's" or "what's" or "that's" or "there's" or "here's" or "who's" or "let's"));

            int RunEnd(int from, int limit)
            {
                int k = from;
                while (k < limit && !ProbeLexicon.FunctionWords.Contains(Words[k])) k++;
                return k;
            }
        }

        /// <summary>The task the phrase belongs to.</summary>
        public string TaskId { get; }

        /// <summary>The phrase as written in the registry.</summary>
        public string Text { get; }

        /// <summary>Lower-case words (match-key form).</summary>
        public string[] Words { get; }

        /// <summary>First word after leading politeness words.</summary>
        public int CoreStart { get; }

        /// <summary>End of the phrase without a trailing "please".</summary>
        public int CoreEnd { get; }

        /// <summary>End of the verb (one word, or two with a particle).</summary>
        public int VerbEnd { get; } = -1;

        /// <summary>Start of the object noun phrase, including its determiner; -1 when none was found.</summary>
        public int ObjectStart { get; } = -1;

        /// <summary>First word of the object after its determiner.</summary>
        public int ObjectHeadStart { get; } = -1;

        /// <summary>End of the object noun phrase; its last word is the head noun.</summary>
        public int ObjectEnd { get; } = -1;

        /// <summary>Start of the destination noun phrase (after its preposition); -1 when none.</summary>
        public int DestinationStart { get; } = -1;

        /// <summary>End of the destination noun phrase.</summary>
        public int DestinationEnd { get; } = -1;

        /// <summary>The phrase without leading politeness words or a trailing "please".</summary>
        public string Core => string.Join(' ', Words[CoreStart..CoreEnd]);

        /// <summary>True when an object noun phrase was found.</summary>
        public bool HasObject => ObjectStart >= 0;

        /// <summary>The object noun phrase with a determiner ("the" when the phrase has none).</summary>
        public string ObjectWithDeterminer
            => (ObjectStart == ObjectHeadStart ? "the " : Words[ObjectStart] + " ") + string.Join(' ', Words[ObjectHeadStart..ObjectEnd]);

        /// <summary>The words with [start, end) replaced by <paramref name="replacement"/>.</summary>
        public string Replace(int start, int end, string replacement)
            => string.Join(' ', Words[..start].Append(replacement).Concat(Words[end..]));

        /// <summary>The words of the span.</summary>
        public string Span(int start, int end) => string.Join(' ', Words[start..end]);
    }

    /// <summary>Everything the mutations need from the registry, computed once.</summary>
    internal sealed class Context
    {
        public Context(TaskRegistry registry)
        {
            var byTask = new List<IReadOnlyList<Phrase>>();
            var vocabulary = new HashSet<string>(StringComparer.Ordinal);
            foreach (var task in registry.Tasks)
            {
                var phrases = task.Phrases.Select(p => new Phrase(task.Id, p)).Where(p => p.Words.Length > 0).ToList();
                if (phrases.Count > 0) byTask.Add(phrases);
                var own = new HashSet<string>(StringComparer.Ordinal);
                foreach (string text in task.Phrases.Concat(task.AlsoWords)) own.UnionWith(WordsOf(text));
                TaskVocabularies.Add((task.Id, own));
                vocabulary.UnionWith(own);
                foreach (string text in task.MustReject) vocabulary.UnionWith(WordsOf(text));
                foreach (string p in task.Phrases) ApprovedKeys.Add(TextNormalizer.MatchKey(p));
                foreach (string m in task.MustReject) MustRejectKeys.Add(TextNormalizer.MatchKey(m));
            }
            PhrasesByTask = byTask;
            Vocabulary = vocabulary;
            VocabularyList = vocabulary.Order(StringComparer.Ordinal).ToArray();
            ContentWords = VocabularyList.Where(w => !ProbeLexicon.FunctionWords.Contains(w) && w.Any(char.IsLetter)).ToArray();
            AllPhraseWords = byTask.SelectMany(p => p).Select(p => p.Words).ToArray();
        }

        /// <summary>Approved phrases grouped by task (tasks in registry order, phrases in registry order).</summary>
        public IReadOnlyList<IReadOnlyList<Phrase>> PhrasesByTask { get; }

        /// <summary>Match keys of every approved phrase.</summary>
        public HashSet<string> ApprovedKeys { get; } = new(StringComparer.Ordinal);

        /// <summary>Match keys of every must_reject phrase.</summary>
        public HashSet<string> MustRejectKeys { get; } = new(StringComparer.Ordinal);

        /// <summary>Every word of the registry's phrases, look-alikes and extra words.</summary>
        public HashSet<string> Vocabulary { get; }

        /// <summary><see cref="Vocabulary"/> in ordinal order (for deterministic draws).</summary>
        public string[] VocabularyList { get; }

        /// <summary>The vocabulary without function words.</summary>
        public string[] ContentWords { get; }

        /// <summary>Each task's own words (phrases and extra words).</summary>
        public List<(string TaskId, HashSet<string> Words)> TaskVocabularies { get; } = [];

        /// <summary>The words of every approved phrase.</summary>
        public string[][] AllPhraseWords { get; }

        /// <summary>True when every content word of <paramref name="words"/> is in one task's own vocabulary.</summary>
        public bool CoveredBySingleTask(IEnumerable<string> words)
        {
            var content = words.Where(w => !ProbeLexicon.FunctionWords.Contains(w)).ToList();
            return content.Count > 0 && TaskVocabularies.Any(t => content.All(t.Words.Contains));
        }

        /// <summary>True when <paramref name="word"/> is a content word of a task other than <paramref name="taskId"/>.</summary>
        public bool BelongsToOtherTask(string word, string taskId)
            => !ProbeLexicon.FunctionWords.Contains(word) && TaskVocabularies.Any(t => t.TaskId != taskId && t.Words.Contains(word));
    }

    /// <summary>Lower-case words of a text: its match key split at spaces, punctuation trimmed from each word.</summary>
    internal static string[] WordsOf(string text)
        => TextNormalizer.MatchKey(text).Split(' ', StringSplitOptions.RemoveEmptyEntries)
            .Select(w => w.Trim('.', ',', ';', ':', '!', '?', '"', '(', ')'))
            .Where(w => w.Length > 0)
            .ToArray();
}
