using System.Collections;
using System.Text;
using System.Text.Encodings.Web;
using System.Text.Json;

namespace RateDeck.Outputs;

/// <summary>
/// Writes a machine-readable summary, a dictionary of named fields, as one JSON object.
/// <list type="bullet">
/// <item>A field's value is null, a string, a boolean, a number, an enum value, a dictionary with
/// string keys (a nested object) or a sequence (an array) of these. The summary is walked by type,
/// without reflection, so the same code runs in the precompiled native program; any other value is a
/// programming error (<see cref="ArgumentException"/>), which the tests of every verb's
/// <c>--json</c> would show.</item>
/// <item>Keys are written as given: field names are snake_case by convention, and dictionary keys
/// are usually user names (deck parameters, state labels) that must stay recognisable. Enum values
/// are snake_case strings (<c>RungeKutta4</c> becomes <c>runge_kutta4</c>).</item>
/// <item>Numbers are written in the invariant, shortest round-trip form.</item>
/// <item>A non-finite double (NaN or an infinity) is written as <c>null</c>: strict JSON has no
/// such numbers, and <c>null</c> keeps the field's type "number or null" for jq and scripts. A
/// summary for which infinity and NaN mean different things must say so in a separate field.</item>
/// <item>Non-ASCII text (state labels, units) is written as is, not as <c>\u</c> escapes.</item>
/// </list>
/// </summary>
public static class JsonSummary
{
    /// <summary>Writes <paramref name="fields"/> followed by a line end, on one line unless <paramref name="indented"/>.</summary>
    /// <exception cref="ArgumentException">A value is of a kind the summary format does not hold.</exception>
    public static void Write(TextWriter writer, IEnumerable<KeyValuePair<string, object?>> fields, bool indented = false)
    {
        ArgumentNullException.ThrowIfNull(writer);
        writer.Write(Serialize(fields, indented));
        writer.Write('\n');
    }

    /// <summary>The JSON text of <paramref name="fields"/> as one object, without a trailing line end.</summary>
    /// <exception cref="ArgumentException">A value is of a kind the summary format does not hold.</exception>
    public static string Serialize(IEnumerable<KeyValuePair<string, object?>> fields, bool indented = false)
    {
        ArgumentNullException.ThrowIfNull(fields);
        return SerializeValue(fields, indented);
    }

    /// <summary>The JSON text of one value of the kinds a summary holds (an array of strings, say).</summary>
    /// <exception cref="ArgumentException">The value is of a kind the summary format does not hold.</exception>
    public static string SerializeValue(object? value, bool indented = false)
    {
        using var buffer = new MemoryStream();
        using (var json = new Utf8JsonWriter(buffer, WriterOptions(indented)))
        {
            WriteValue(json, value);
        }

        return Encoding.UTF8.GetString(buffer.GetBuffer(), 0, (int)buffer.Length);
    }

    private static JsonWriterOptions WriterOptions(bool indented) =>
        new() { Indented = indented, NewLine = "\n", Encoder = JavaScriptEncoder.UnsafeRelaxedJsonEscaping };

    private static void WriteValue(Utf8JsonWriter json, object? value)
    {
        switch (value)
        {
            case null:
                json.WriteNullValue();
                break;
            case string text:
                json.WriteStringValue(text);
                break;
            case bool flag:
                json.WriteBooleanValue(flag);
                break;
            case double number:
                WriteNumber(json, number);
                break;
            case int count:
                json.WriteNumberValue(count);
                break;
            case long count:
                json.WriteNumberValue(count);
                break;
            case Enum member:
                json.WriteStringValue(JsonNamingPolicy.SnakeCaseLower.ConvertName(member.ToString()));
                break;
            case IEnumerable<KeyValuePair<string, object?>> fields:
                WriteObject(json, fields.Select(f => (f.Key, f.Value)));
                break;
            case IDictionary dictionary:
                WriteObject(json, Entries(dictionary));
                break;
            case IEnumerable items:
                json.WriteStartArray();
                foreach (var item in items)
                {
                    WriteValue(json, item);
                }

                json.WriteEndArray();
                break;
            default:
                throw new ArgumentException($"a JSON summary holds no value of type {value.GetType()}; pass its fields as a dictionary");
        }
    }

    private static void WriteObject(Utf8JsonWriter json, IEnumerable<(string Key, object? Value)> fields)
    {
        json.WriteStartObject();
        foreach (var (key, value) in fields)
        {
            json.WritePropertyName(key);
            WriteValue(json, value);
        }

        json.WriteEndObject();
    }

    private static void WriteNumber(Utf8JsonWriter json, double number)
    {
        if (double.IsFinite(number))
        {
            json.WriteNumberValue(number);
        }
        else
        {
            json.WriteNullValue();
        }
    }

    /// <summary>The entries of a dictionary of any value type (its plain enumerator yields key-value pairs, not entries).</summary>
    private static IEnumerable<(string Key, object? Value)> Entries(IDictionary dictionary)
    {
        var entries = dictionary.GetEnumerator();
        while (entries.MoveNext())
        {
            yield return (entries.Key as string ?? throw UnsupportedKey(entries.Key), entries.Value);
        }
    }

    private static ArgumentException UnsupportedKey(object key) =>
        new($"a JSON summary's dictionary keys are strings, not {key.GetType()}");
}
