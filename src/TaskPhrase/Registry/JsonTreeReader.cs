using System.Text;
using System.Text.Json;

namespace TaskPhrase.Registry;

/// <summary>
/// Turns the canonical JSON form into the same <see cref="RegistryNode"/> tree the YAML reader builds, so that one
/// validator checks both. Strings become quoted scalars; numbers, <c>true</c>, <c>false</c> and <c>null</c> become
/// plain scalars with their literal text. Positions are line 1 and the character column (the form is one line).
/// </summary>
internal static class JsonTreeReader
{
    private sealed class Frame(RegistryNode node)
    {
        public RegistryNode Node { get; } = node;
        public RegistryScalar? PendingKey { get; set; }
    }

    public static RegistryNode? Read(byte[] utf8, RegistryLoadOptions options, DiagnosticBag bag, out bool fatal)
    {
        fatal = false;
        var reader = new Utf8JsonReader(utf8, new JsonReaderOptions
        {
            CommentHandling = JsonCommentHandling.Disallow,
            AllowTrailingCommas = false,
            MaxDepth = options.MaxDepth,
        });
        var locator = new Locator(utf8);
        var stack = new Stack<Frame>();
        RegistryNode? root = null;
        int nodes = 0;
        try
        {
            while (reader.Read())
            {
                var at = locator.At((int)reader.TokenStartIndex);
                if (reader.TokenType is not (JsonTokenType.EndArray or JsonTokenType.EndObject or JsonTokenType.PropertyName)
                    && ++nodes > options.MaxNodes)
                {
                    bag.Error(RegistryDiagnosticCodes.TooManyNodes, at,
                        $"the canonical form holds more than {options.MaxNodes:N0} values (RegistryLoadOptions.MaxNodes).");
                    fatal = true;
                    return null;
                }
                switch (reader.TokenType)
                {
                    case JsonTokenType.StartObject:
                        stack.Push(new Frame(new RegistryMapping(at)));
                        break;
                    case JsonTokenType.StartArray:
                        stack.Push(new Frame(new RegistrySequence(at)));
                        break;
                    case JsonTokenType.EndObject or JsonTokenType.EndArray:
                        Attach(stack.Pop().Node, stack, ref root, bag);
                        break;
                    case JsonTokenType.PropertyName:
                        stack.Peek().PendingKey = new RegistryScalar(at, reader.GetString()!, isPlain: true);
                        break;
                    case JsonTokenType.String:
                        Attach(new RegistryScalar(at, reader.GetString()!, isPlain: false), stack, ref root, bag);
                        break;
                    case JsonTokenType.Number or JsonTokenType.True or JsonTokenType.False or JsonTokenType.Null:
                        string literal = Encoding.UTF8.GetString(reader.ValueSpan);
                        Attach(new RegistryScalar(at, literal, isPlain: true), stack, ref root, bag);
                        break;
                }
            }
        }
        catch (Exception ex) when (ex is JsonException or InvalidOperationException)
        {
            bag.Error(RegistryDiagnosticCodes.JsonSyntax, locator.At((int)Math.Min(reader.BytesConsumed, utf8.Length)),
                $"the canonical JSON is malformed ({ex.Message}); rebuild it from the registry file.");
            fatal = true;
            return null;
        }
        return root;
    }

    private static void Attach(RegistryNode node, Stack<Frame> stack, ref RegistryNode? root, DiagnosticBag bag)
    {
        if (stack.Count == 0)
        {
            root = node;
            return;
        }
        var top = stack.Peek();
        if (top.Node is RegistrySequence sequence)
        {
            sequence.Items.Add(node);
            return;
        }
        YamlTreeReader.AddEntry((RegistryMapping)top.Node, top.PendingKey!, node, bag);
        top.PendingKey = null;
    }

    /// <summary>Maps forward-moving byte offsets to 1-based line and character column.</summary>
    private sealed class Locator(byte[] utf8)
    {
        private int _offset, _line = 1, _column = 1;

        public SourcePosition At(int offset)
        {
            offset = Math.Clamp(offset, 0, utf8.Length);
            if (offset < _offset) { _offset = 0; _line = 1; _column = 1; }
            for (; _offset < offset; _offset++)
            {
                byte b = utf8[_offset];
                if (b == (byte)'\n') { _line++; _column = 1; }
                else if ((b & 0xC0) != 0x80) _column++;
            }
            return new SourcePosition(_line, _column);
        }
    }
}
