using System.Text.RegularExpressions;
using Tomlyn.Parsing;
using Tomlyn.Syntax;

namespace RateDeck.Decks;

/// <summary>A TOML value of a deck with the place it was written.</summary>
internal abstract class TomlNode(SourceSpan span)
{
    /// <summary>The first character of the value (the opening quote of a string).</summary>
    public SourceSpan Span { get; } = span;

    /// <summary>What the value is, for messages: "a string", "an array" and so on.</summary>
    public abstract string Describe();
}

/// <summary>A string, integer (long), float (double), boolean or date.</summary>
internal sealed class TomlScalar(object value, SourceSpan span, SourceSpan contentSpan) : TomlNode(span)
{
    public object Value { get; } = value;

    /// <summary>For a string, its first character inside the quotes; otherwise <see cref="TomlNode.Span"/>.</summary>
    public SourceSpan ContentSpan { get; } = contentSpan;

    public override string Describe() => Value switch
    {
        string => "a string",
        long => "a whole number",
        double => "a number",
        bool => "true or false",
        _ => "a date",
    };
}

internal sealed class TomlArrayNode(IReadOnlyList<TomlNode> items, SourceSpan span) : TomlNode(span)
{
    public IReadOnlyList<TomlNode> Items { get; } = items;

    public override string Describe() => "an array";
}

/// <summary>A key of a table: its name, where the name is written, and its value.</summary>
internal sealed record TomlEntry(string Key, SourceSpan KeySpan, TomlNode Value);

/// <summary>A table (a [header] table, an inline table, or one made implicitly by a dotted key), keys in order.</summary>
internal sealed class TomlTableNode(SourceSpan span) : TomlNode(span)
{
    private readonly OrderedDictionary<string, TomlEntry> _entries = new(StringComparer.Ordinal);

    public IEnumerable<TomlEntry> Entries => _entries.Values;

    public TomlEntry? Find(string key) => _entries.TryGetValue(key, out var entry) ? entry : null;

    public void Set(TomlEntry entry) => _entries[entry.Key] = entry;

    public void Remove(string key) => _entries.Remove(key);

    /// <summary>The table under <paramref name="key"/>, created (at <paramref name="span"/>) when absent.</summary>
    public TomlTableNode GetOrAddTable(string key, SourceSpan span)
    {
        if (Find(key)?.Value is TomlTableNode existing)
        {
            return existing;
        }

        // Tomlyn's validation has already rejected a key defined both as a value and a table,
        // so this replaces nothing in a deck; an override may replace a value by a table.
        var table = new TomlTableNode(span);
        Set(new TomlEntry(key, span, table));
        return table;
    }

    /// <summary>
    /// A copy whose tables are new at every depth, so that overrides applied to it leave this one
    /// as it was; scalars and arrays, never changed in place, are shared.
    /// </summary>
    public TomlTableNode DeepCopy()
    {
        var copy = new TomlTableNode(Span);
        foreach (var entry in Entries)
        {
            copy.Set(entry.Value is TomlTableNode table ? entry with { Value = table.DeepCopy() } : entry);
        }

        return copy;
    }

    public override string Describe() => "a table";
}

/// <summary>Turns TOML text into <see cref="TomlNode"/>s with one-based spans, using Tomlyn's syntax tree.</summary>
internal static partial class TomlTree
{
    /// <summary>
    /// Parses a deck into its values and Tomlyn's full syntax tree (every comment and blank kept);
    /// a TOML syntax or validation error becomes a <see cref="DeckException"/> at Tomlyn's position.
    /// </summary>
    public static (TomlTableNode Root, DocumentSyntax Syntax) ParseDocument(string text, string path)
    {
        var document = ParseSyntax(text, path);
        var error = document.Diagnostics.FirstOrDefault(d => d.Kind == DiagnosticMessageKind.Error);
        if (error is not null)
        {
            throw new DeckException(Locator.ToSpan(path, error.Span.Start), $"TOML syntax: {error.Message}");
        }

        var locator = new Locator(path, null);
        var root = new TomlTableNode(new SourceSpan(path, 1, 1));
        AddKeyValues(root, document.KeyValues, locator);
        foreach (var table in document.Tables)
        {
            if (table is TableArraySyntax)
            {
                throw new DeckException(locator.At(table), "arrays of tables ([[...]]) are not part of the deck format; use a plain [table]");
            }

            var target = root;
            foreach (var (part, span) in KeyParts(table.Name!, locator))
            {
                target = target.GetOrAddTable(part, span);
            }

            AddKeyValues(target, table.Items, locator);
        }

        return (root, document);
    }

    /// <summary>Tomlyn's limit of nested arrays and inline tables (it throws at this depth).</summary>
    private const int _tomlynMaxDepth = 64;

    /// <summary>
    /// Tomlyn's syntax tree. Tomlyn stops at <see cref="_tomlynMaxDepth"/> nested arrays or inline
    /// tables with an exception that carries no position; it becomes a located error like any
    /// other syntax error, at the bracket that goes too deep.
    /// </summary>
    private static DocumentSyntax ParseSyntax(string text, string path)
    {
        try
        {
            return SyntaxParser.Parse(text, path, validate: true);
        }
        catch (Tomlyn.TomlException) when (DeepestBracket(text, _tomlynMaxDepth) is { } offset)
        {
            throw new DeckException(SpanAt(path, text, offset), $"TOML syntax: arrays or inline tables nested {_tomlynMaxDepth} deep; a deck needs only a few levels");
        }
        catch (ArgumentOutOfRangeException) when (UnfinishedEscapePattern().Match(text) is { Success: true } escape)
        {
            // Tomlyn's lexer throws instead of reporting a \u or \U escape cut short by the end of the file.
            throw new DeckException(SpanAt(path, text, escape.Index), $"TOML syntax: the file ends inside the escape `{escape.Value}`; \\u takes 4 hex digits and \\U takes 8");
        }
    }

    private static SourceSpan SpanAt(string path, string text, int offset)
    {
        var before = text.AsSpan(0, offset);
        return new SourceSpan(path, before.Count('\n') + 1, offset - before.LastIndexOf('\n'));
    }

    [GeneratedRegex(@"\\[uU][0-9A-Fa-f]{0,7}\z")]
    private static partial Regex UnfinishedEscapePattern();

    /// <summary>
    /// The offset of the first '[' or '{' that opens level <paramref name="depth"/>, skipping
    /// strings and comments, or null. Table headers open and close on one line, so they never
    /// reach a deep level.
    /// </summary>
    private static int? DeepestBracket(string text, int depth)
    {
        var level = 0;
        for (var k = 0; k < text.Length; k++)
        {
            switch (text[k])
            {
                case '#':
                    k = text.IndexOf('\n', k) is var end && end < 0 ? text.Length : end;
                    break;
                case '"' or '\'':
                    k = EndOfString(text, k);
                    break;
                case '[' or '{' when ++level >= depth:
                    return k;
                case ']' or '}':
                    level--;
                    break;
            }
        }

        return null;
    }

    /// <summary>The offset of the closing quote of the string opening at <paramref name="start"/> (one, or three quotes; escapes only in "...").</summary>
    private static int EndOfString(string text, int start)
    {
        var quote = text[start];
        var delimiter = text.AsSpan(start).StartsWith(new string(quote, 3)) ? new string(quote, 3) : quote.ToString();
        for (var k = start + delimiter.Length; k < text.Length; k++)
        {
            if (quote == '"' && text[k] == '\\')
            {
                k++;
            }
            else if (text.AsSpan(k).StartsWith(delimiter))
            {
                return k + delimiter.Length - 1;
            }
        }

        return text.Length;
    }

    /// <summary>
    /// Parses the value of a <c>--set</c> override as TOML, every part placed at
    /// <paramref name="origin"/>. Text that is not a TOML value (a bare word such as
    /// <c>euler</c>) is taken as a string, so that quoting on the shell is optional.
    /// </summary>
    public static TomlNode ParseOverrideValue(string valueText, SourceSpan origin)
    {
        DocumentSyntax document;
        try
        {
            document = ParseSyntax("v = " + valueText + "\n", "--set");
        }
        catch (DeckException e)
        {
            throw new DeckException(origin, e.Problem);
        }

        if (document.HasErrors || document.Tables.ChildrenCount != 0 || document.KeyValues.ChildrenCount != 1)
        {
            return new TomlScalar(valueText.Trim(), origin, origin);
        }

        return Convert(document.KeyValues.GetChild(0)!.Value!, new Locator("--set", origin));
    }

    private static void AddKeyValues(TomlTableNode table, SyntaxList<KeyValueSyntax> keyValues, Locator locator)
    {
        foreach (var keyValue in keyValues)
        {
            AddKeyValue(table, keyValue, locator);
        }
    }

    private static void AddKeyValue(TomlTableNode table, KeyValueSyntax keyValue, Locator locator)
    {
        var parts = KeyParts(keyValue.Key!, locator);
        var target = table;
        for (var k = 0; k < parts.Count - 1; k++)
        {
            target = target.GetOrAddTable(parts[k].Name, parts[k].Span);
        }

        var last = parts[^1];
        target.Set(new TomlEntry(last.Name, last.Span, Convert(keyValue.Value!, locator)));
    }

    private static List<(string Name, SourceSpan Span)> KeyParts(KeySyntax key, Locator locator)
    {
        var parts = new List<(string, SourceSpan)> { KeyPart(key.Key!, locator) };
        foreach (var dotted in key.DotKeys)
        {
            parts.Add(KeyPart(dotted.Key!, locator));
        }

        return parts;
    }

    private static (string Name, SourceSpan Span) KeyPart(BareKeyOrStringValueSyntax part, Locator locator) => part switch
    {
        BareKeySyntax bare => (bare.Key!.Text!, locator.At(bare)),
        StringValueSyntax quoted => (quoted.Value ?? "", locator.At(quoted)),
        _ => throw new InvalidOperationException($"unexpected key syntax {part.GetType().Name}"),
    };

    private static TomlNode Convert(ValueSyntax value, Locator locator)
    {
        var at = locator.At(value);
        switch (value)
        {
            case StringValueSyntax s:
                return new TomlScalar(s.Value ?? "", at, locator.Content(s));
            case IntegerValueSyntax i:
                return new TomlScalar(i.Value, at, at);
            case FloatValueSyntax f:
                return new TomlScalar(f.Value, at, at);
            case BooleanValueSyntax b:
                return new TomlScalar(b.Value, at, at);
            case DateTimeValueSyntax d:
                return new TomlScalar(d.Value, at, at);
            case ArraySyntax array:
                return new TomlArrayNode(array.Items.Select(item => Convert(item.Value!, locator)).ToList(), at);
            case InlineTableSyntax inline:
                var table = new TomlTableNode(at);
                foreach (var item in inline.Items)
                {
                    AddKeyValue(table, item.KeyValue!, locator);
                }

                return table;
            default:
                throw new InvalidOperationException($"unexpected TOML value syntax {value.GetType().Name}");
        }
    }

    /// <summary>Maps syntax nodes to spans: in a file, or all at one fixed origin (an override).</summary>
    private sealed class Locator(string path, SourceSpan? fixedOrigin)
    {
        public SourceSpan At(SyntaxNode node) => fixedOrigin ?? ToSpan(path, node.Span.Start);

        /// <summary>
        /// The first character inside the quotes: one past a single quote, three past a triple one,
        /// and the start of the next line when a multi-line string opens with a line break (TOML
        /// trims that line break).
        /// </summary>
        public SourceSpan Content(StringValueSyntax s)
        {
            var at = At(s);
            if (fixedOrigin is not null)
            {
                return at;
            }

            var token = s.Token!;
            if (token.TokenKind is not (TokenKind.StringMulti or TokenKind.StringLiteralMulti))
            {
                return at.Shift(1);
            }

            var raw = token.Text ?? "";
            return raw.Length > 3 && raw[3] is '\n' or '\r'
                ? at with { Line = at.Line + 1, Column = 1 }
                : at.Shift(3);
        }

        public static SourceSpan ToSpan(string path, TextPosition position) => new(path, position.Line + 1, position.Column + 1);
    }
}
