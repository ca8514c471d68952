using System;
using System.Collections.Generic;

namespace ThermalSampling.Cli;

/// <summary>An invalid scenario: every problem found, each naming its JSON path.</summary>
public sealed class ScenarioException : Exception
{
    /// <summary>Creates the exception from a list of problems.</summary>
    /// <param name="problems">One line per problem, each starting with its JSON path.</param>
    public ScenarioException(IReadOnlyList<string> problems)
        : base("Invalid scenario:" + Environment.NewLine + string.Join(Environment.NewLine, problems))
    {
        Problems = problems;
    }

    /// <summary>The problems, one per line.</summary>
    public IReadOnlyList<string> Problems { get; }
}
