using System;
using System.Globalization;
using System.IO;
using System.Security.Cryptography;
using System.Text.Json;

namespace ThermalSampling.Persistence;

/// <summary>
/// The framing every file the library writes for itself shares (checkpoints, record files): one line of UTF-8 JSON
/// metadata whose first key names the format and whose last key, <c>bodyBytes</c>, the body's length; the body; then
/// 32 bytes of SHA-256 over the metadata line and the body. Nothing is returned unless the length and checksum are right.
/// </summary>
internal static class SignedFile
{
    private const int ChecksumBytes = 32;
    private const int MaximumMetadataBytes = 32 * 1024 * 1024;

    /// <summary>Writes the metadata line (<paramref name="metadata"/> writes the keys after <c>format</c> and <c>formatVersion</c>), the body and the checksum.</summary>
    internal static void Write(Stream stream, string formatName, int formatVersion, Action<Utf8JsonWriter> metadata, byte[] body)
    {
        var buffer = new MemoryStream();
        // Relaxed escaping keeps the line readable (a version's '+' stays '+'); control characters are still escaped.
        using (var w = new Utf8JsonWriter(buffer, new JsonWriterOptions { Encoder = System.Text.Encodings.Web.JavaScriptEncoder.UnsafeRelaxedJsonEscaping }))
        {
            w.WriteStartObject();
            w.WriteString("format", formatName);
            w.WriteNumber("formatVersion", formatVersion);
            metadata(w);
            w.WriteNumber("bodyBytes", body.Length);
            w.WriteEndObject();
        }
        buffer.WriteByte((byte)'\n'); // the JSON writer escapes control characters, so this is the only newline
        var line = buffer.ToArray();
        using var hash = IncrementalHash.CreateHash(HashAlgorithmName.SHA256);
        hash.AppendData(line);
        hash.AppendData(body);
        stream.Write(line);
        stream.Write(body);
        stream.Write(hash.GetHashAndReset());
        stream.Flush();
    }

    /// <summary>
    /// Reads a file written by <see cref="Write"/> as <paramref name="what"/> (for messages: "checkpoint", "record
    /// file"): checks the format name and version, the length, the checksum and that nothing follows.
    /// </summary>
    internal static (JsonElement Metadata, byte[] Body) Read(Stream stream, string what, string formatName, int formatVersion)
    {
        using var hash = IncrementalHash.CreateHash(HashAlgorithmName.SHA256);
        var line = ReadMetadataLine(stream, what);
        hash.AppendData(line);
        JsonElement meta;
        try
        {
            using var document = JsonDocument.Parse(line);
            meta = document.RootElement.Clone();
        }
        catch (JsonException ex)
        {
            throw new CheckpointException($"The {what}'s metadata line is not valid JSON (the file is damaged).", ex);
        }
        if (meta.ValueKind != JsonValueKind.Object || !meta.TryGetProperty("format", out var format) || format.ValueKind != JsonValueKind.String || format.GetString() != formatName)
        {
            throw new CheckpointException($"This is not a {what}: its metadata does not start with \"format\": \"{formatName}\".");
        }
        int version = Get(meta, "formatVersion", JsonValueKind.Number, what).GetInt32();
        if (version != formatVersion)
        {
            throw new CheckpointException(string.Create(CultureInfo.InvariantCulture, $"The {what} has format version {version}; this library reads version {formatVersion}."));
        }
        long bodyBytes = Get(meta, "bodyBytes", JsonValueKind.Number, what).GetInt64();
        if (bodyBytes < 0 || bodyBytes > Array.MaxLength)
        {
            throw new CheckpointException(string.Create(CultureInfo.InvariantCulture, $"The {what} announces a body of {bodyBytes} bytes; valid: 0 to {Array.MaxLength}."));
        }
        if (stream.CanSeek && stream.Length - stream.Position < bodyBytes + ChecksumBytes)
        {
            throw new CheckpointException(string.Create(CultureInfo.InvariantCulture,
                $"The {what} is cut short: {stream.Length - stream.Position} bytes follow the metadata, which announces {bodyBytes} + {ChecksumBytes} (body and checksum). The write was interrupted; use an earlier {what}."));
        }
        var body = ReadExactly(stream, (int)bodyBytes, "body", what);
        hash.AppendData(body);
        var checksum = ReadExactly(stream, ChecksumBytes, "checksum", what);
        if (!CryptographicOperations.FixedTimeEquals(checksum, hash.GetHashAndReset()))
        {
            throw new CheckpointException($"The {what} fails its SHA-256 checksum: the file is damaged. Nothing was loaded; use an earlier {what}.");
        }
        if (stream.ReadByte() >= 0)
        {
            throw new CheckpointException($"The {what} has bytes after its checksum: the file is damaged or two files were joined.");
        }
        return (meta, body);
    }

    /// <summary>The metadata value <paramref name="name"/> of kind <paramref name="kind"/>, or a message naming it.</summary>
    internal static JsonElement Get(JsonElement meta, string name, JsonValueKind kind, string what)
    {
        if (!meta.TryGetProperty(name, out var value) || value.ValueKind != kind)
        {
            throw new CheckpointException($"The {what}'s metadata lacks \"{name}\" (or it has the wrong type).");
        }
        return value;
    }

    private static byte[] ReadMetadataLine(Stream stream, string what)
    {
        var line = new MemoryStream();
        while (true)
        {
            int b = stream.ReadByte();
            if (b < 0)
            {
                throw new CheckpointException(line.Length == 0 ? $"The {what} is empty." : $"The {what} is cut short inside its metadata line.");
            }
            line.WriteByte((byte)b);
            if (b == '\n')
            {
                return line.ToArray();
            }
            if (line.Length > MaximumMetadataBytes)
            {
                throw new CheckpointException($"The {what}'s metadata line is longer than {MaximumMetadataBytes} bytes: this is not a {what}.");
            }
        }
    }

    private static byte[] ReadExactly(Stream stream, int count, string part, string what)
    {
        // Grows with the data actually read, so a damaged length never allocates more than the stream holds.
        var result = new MemoryStream();
        var buffer = new byte[Math.Min(count, 1 << 20)];
        while (result.Length < count)
        {
            int n = stream.Read(buffer, 0, (int)Math.Min(buffer.Length, count - result.Length));
            if (n == 0)
            {
                throw new CheckpointException(string.Create(CultureInfo.InvariantCulture,
                    $"The {what} is cut short in its {part}: {result.Length} of {count} bytes. The write was interrupted; use an earlier {what}."));
            }
            result.Write(buffer, 0, n);
        }
        return result.ToArray();
    }
}
