using System.Reflection;

namespace ThermalSampling.Internal;

/// <summary>The library's informational version, for provenance and checkpoints (every layer may read it).</summary>
internal static class LibraryVersion
{
    /// <summary>The informational version of this assembly, or "unknown".</summary>
    internal static string Current { get; } =
        typeof(LibraryVersion).Assembly.GetCustomAttribute<AssemblyInformationalVersionAttribute>()?.InformationalVersion ?? "unknown";
}
