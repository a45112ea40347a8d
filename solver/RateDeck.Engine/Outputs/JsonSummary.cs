using System.Text.Encodings.Web;
using System.Text.Json;
using System.Text.Json.Serialization;

namespace RateDeck.Outputs;

/// <summary>
/// Writes a machine-readable summary as one JSON object (System.Text.Json).
/// <list type="bullet">
/// <item>Property names are snake_case (<c>SpectralRadius</c> becomes <c>spectral_radius</c>); enum
/// values are snake_case strings. Dictionary keys are written as given, because they are usually
/// user names (deck parameters, state labels) that must stay recognisable.</item>
/// <item>Numbers are written in the invariant, shortest round-trip form.</item>
/// <item>A non-finite double (NaN or an infinity) is written as <c>null</c>: strict JSON has no
/// such numbers, and <c>null</c> keeps the field's type "number or null" for jq and scripts. A
/// summary for which infinity and NaN mean different things must say so in a separate field.</item>
/// <item>Non-ASCII text (state labels, units) is written as is, not as <c>\u</c> escapes.</item>
/// </list>
/// </summary>
public static class JsonSummary
{
    private static readonly JsonSerializerOptions _compact = CreateOptions(indented: false);
    private static readonly JsonSerializerOptions _indented = CreateOptions(indented: true);

    /// <summary>Writes <paramref name="value"/> followed by a line end, on one line unless <paramref name="indented"/>.</summary>
    public static void Write<T>(TextWriter writer, T value, bool indented = false)
    {
        ArgumentNullException.ThrowIfNull(writer);
        writer.Write(Serialize(value, indented));
        writer.Write('\n');
    }

    /// <summary>The JSON text of <paramref name="value"/>, without a trailing line end.</summary>
    public static string Serialize<T>(T value, bool indented = false) =>
        JsonSerializer.Serialize(value, indented ? _indented : _compact);

    /// <summary>Reads JSON written by <see cref="Serialize"/> back into <typeparamref name="T"/>.</summary>
    /// <exception cref="JsonException">The text is not JSON of that shape.</exception>
    public static T? Deserialize<T>(string json) => JsonSerializer.Deserialize<T>(json, _compact);

    private static JsonSerializerOptions CreateOptions(bool indented)
    {
        var options = new JsonSerializerOptions
        {
            PropertyNamingPolicy = JsonNamingPolicy.SnakeCaseLower,
            WriteIndented = indented,
            NewLine = "\n",
            Encoder = JavaScriptEncoder.UnsafeRelaxedJsonEscaping,
        };
        options.Converters.Add(new NonFiniteAsNullConverter());
        options.Converters.Add(new JsonStringEnumConverter(JsonNamingPolicy.SnakeCaseLower));
        options.MakeReadOnly(populateMissingResolver: true);
        return options;
    }

    private sealed class NonFiniteAsNullConverter : JsonConverter<double>
    {
        // Reads null back as NaN, the inverse of writing every non-finite value as null.
        public override bool HandleNull => true;

        public override double Read(ref Utf8JsonReader reader, Type typeToConvert, JsonSerializerOptions options) =>
            reader.TokenType == JsonTokenType.Null ? double.NaN : reader.GetDouble();

        public override void Write(Utf8JsonWriter writer, double value, JsonSerializerOptions options)
        {
            if (double.IsFinite(value))
            {
                writer.WriteNumberValue(value);
            }
            else
            {
                writer.WriteNullValue();
            }
        }
    }
}
