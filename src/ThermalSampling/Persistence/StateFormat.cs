using System;
using System.Buffers.Binary;
using System.Globalization;
using System.IO;
using System.Runtime.InteropServices;
using System.Text;

namespace ThermalSampling.Persistence;

/// <summary>
/// Writes one chain group's state as a sequence of sections: a 4-character ASCII tag, a signed 64-bit count and that many
/// 64-bit little-endian values (doubles as their IEEE bits, so every value round-trips exactly). docs/checkpoints.md lists
/// the sections of each group kind in order.
/// </summary>
internal sealed class StateWriter
{
    private readonly MemoryStream _out = new();
    private readonly byte[] _word = new byte[8];

    private void Header(string tag, long count)
    {
        _out.Write(Encoding.ASCII.GetBytes(tag));
        BinaryPrimitives.WriteInt64LittleEndian(_word, count);
        _out.Write(_word);
    }

    internal void Words(string tag, ReadOnlySpan<ulong> values)
    {
        Header(tag, values.Length);
        var buffer = new byte[8 * values.Length];
        for (int i = 0; i < values.Length; i++)
        {
            BinaryPrimitives.WriteUInt64LittleEndian(buffer.AsSpan(8 * i), values[i]);
        }
        _out.Write(buffer);
    }

    internal void Doubles(string tag, ReadOnlySpan<double> values) => Words(tag, MemoryMarshal.Cast<double, ulong>(values));

    internal void Longs(string tag, ReadOnlySpan<long> values) => Words(tag, MemoryMarshal.Cast<long, ulong>(values));

    internal byte[] ToArray() => _out.ToArray();
}

/// <summary>Reads what <see cref="StateWriter"/> wrote, checking every tag and count; a mismatch is a <see cref="CheckpointException"/>.</summary>
internal sealed class StateReader
{
    private readonly byte[] _data;
    private readonly string _what;
    private int _at;

    internal StateReader(byte[] data, string what)
    {
        _data = data;
        _what = what;
    }

    private CheckpointException Problem(string message) => new($"The checkpoint's state of {_what} is not what this version expects: {message}");

    /// <summary>Reads the section <paramref name="tag"/>; <paramref name="expected"/> is its exact count, or −1 for any count up to <paramref name="most"/>.</summary>
    internal ulong[] Words(string tag, long expected, long most = -1)
    {
        if (_data.Length - _at < 12)
        {
            throw Problem($"section '{tag}' is missing.");
        }
        string found = Encoding.ASCII.GetString(_data, _at, 4);
        if (found != tag)
        {
            throw Problem($"found section '{found}' where '{tag}' belongs.");
        }
        long count = BinaryPrimitives.ReadInt64LittleEndian(_data.AsSpan(_at + 4));
        _at += 12;
        if (expected >= 0 ? count != expected : count < 0 || count > most)
        {
            throw Problem(string.Create(CultureInfo.InvariantCulture,
                $"section '{tag}' holds {count} values; expected {(expected >= 0 ? expected.ToString(CultureInfo.InvariantCulture) : "0 to " + most.ToString(CultureInfo.InvariantCulture))}."));
        }
        if ((_data.Length - _at) / 8 < count)
        {
            throw Problem($"section '{tag}' is cut short.");
        }
        var values = new ulong[count];
        for (int i = 0; i < values.Length; i++)
        {
            values[i] = BinaryPrimitives.ReadUInt64LittleEndian(_data.AsSpan(_at + 8 * i));
        }
        _at += 8 * (int)count;
        return values;
    }

    internal double[] Doubles(string tag, long expected, long most = -1) => Array.ConvertAll(Words(tag, expected, most), BitConverter.UInt64BitsToDouble);

    internal long[] Longs(string tag, long expected, long most = -1) => Array.ConvertAll(Words(tag, expected, most), w => unchecked((long)w));

    /// <summary>Reads a section into <paramref name="destination"/>, whose length is the expected count.</summary>
    internal void DoublesInto(string tag, Span<double> destination) => Doubles(tag, destination.Length).CopyTo(destination);

    /// <summary>Checks that nothing is left over.</summary>
    internal void End()
    {
        if (_at != _data.Length)
        {
            throw Problem(string.Create(CultureInfo.InvariantCulture, $"{_data.Length - _at} bytes are left after the last section."));
        }
    }

    /// <summary>A whole number in [<paramref name="lower"/>, <paramref name="upper"/>], or a <see cref="CheckpointException"/>.</summary>
    internal long InRange(long value, long lower, long upper, string name)
        => value >= lower && value <= upper ? value
            : throw Problem(string.Create(CultureInfo.InvariantCulture, $"{name} = {value} is outside {lower} to {upper}."));
}

/// <summary>A chain group (a vector of lanes, or one direct chain) whose state can be written at a chunk boundary.</summary>
internal interface IResumableGroup
{
    /// <summary>Writes everything that the group's further draws and its final outcome depend on.</summary>
    void Save(StateWriter writer);

    /// <summary>Steps done so far, summed over the group's chains (burn-in included), for the checkpoint's summary.</summary>
    long ChainStepsDone { get; }
}

/// <summary>A checkpoint that cannot be read or does not belong to the run it is offered to.</summary>
public sealed class CheckpointException : Exception
{
    /// <summary>Creates the exception.</summary>
    /// <param name="message">What is wrong, in a sentence a user can act on.</param>
    public CheckpointException(string message) : base(message)
    {
    }

    /// <summary>Creates the exception with its cause.</summary>
    /// <param name="message">What is wrong.</param>
    /// <param name="inner">The cause.</param>
    public CheckpointException(string message, Exception inner) : base(message, inner)
    {
    }
}
