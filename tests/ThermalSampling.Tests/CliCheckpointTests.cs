using System;
using System.Diagnostics;
using System.Linq;
using System.IO;
using System.Runtime.InteropServices;
using System.Text;
using System.Threading;
using ThermalSampling.Cli;
using Xunit;
using static ThermalSampling.Tests.CliHarness;

namespace ThermalSampling.Tests;

/// <summary>
/// <c>run --checkpoint</c> and <c>resume</c> through the command line, with real child processes killed by SIGKILL or
/// stopped by SIGINT. The reference is the same tool's uninterrupted document (bit identity is the property under test).
/// </summary>
[Collection("processes")]
public sealed class CliCheckpointTests : IDisposable
{
    /// <summary>Invented: an argon-like atom in a one-shell fcc cage, long enough (about 3 s on 2 cores) to be killed part way.</summary>
    private const string LongScenario = """
        {
          "title": "Invented: argon-like atom in a one-shell fcc cage (checkpoint test)",
          "units": { "energy": "eV", "length": "angstrom" },
          "mass": 39.9,
          "potential": { "form": "lennard-jones", "wellDepth": 0.0120, "equilibriumDistance": 3.50 },
          "landscape": { "kind": "sites", "lattice": "fcc", "nearestNeighbourDistance": 3.5, "shells": 1, "confinement": { "shape": "sphere", "radius": 1.0 } },
          "temperatures": [20, 40],
          "sampling": { "method": "metropolis", "chains": 4, "samplesPerChain": 12000000, "burnIn": 20000, "seed": 11 }
        }
        """;

    private const string ShortScenario = """
        {
          "title": "Invented test pair (checkpoint)",
          "mass": 39.9,
          "potential": { "form": "morse", "wellDepth": 0.4, "width": 1.5, "equilibriumDistance": 2.8 },
          "landscape": { "kind": "radial", "window": [2.2, 4.0] },
          "temperatures": [100, 300],
          "sampling": { "chains": 3, "samplesPerChain": 40000, "burnIn": 5000, "seed": 5 }
        }
        """;

    private readonly string _folder = Path.Combine(Path.GetTempPath(), "ts-cli-checkpoint-" + Guid.NewGuid().ToString("N"));

    public CliCheckpointTests() => Directory.CreateDirectory(_folder);

    public void Dispose() => Directory.Delete(_folder, recursive: true);

    private string PathOf(string name) => Path.Combine(_folder, name);

    private static Process Start(params string[] args)
    {
        var psi = new ProcessStartInfo("dotnet") { RedirectStandardOutput = true, RedirectStandardError = true, UseShellExecute = false };
        psi.ArgumentList.Add(typeof(Program).Assembly.Location);
        foreach (string a in args)
        {
            psi.ArgumentList.Add(a);
        }
        return Process.Start(psi)!;
    }

    private static bool WaitForFile(string path, Process process, TimeSpan timeout)
    {
        var clock = Stopwatch.StartNew();
        while (!File.Exists(path))
        {
            if (process.HasExited || clock.Elapsed > timeout)
            {
                return false;
            }
            Thread.Sleep(10);
        }
        return true;
    }

    [Fact]
    public void A_run_killed_with_SIGKILL_at_a_random_moment_resumes_to_the_uninterrupted_document()
    {
        File.WriteAllText(PathOf("long.json"), LongScenario);
        var reference = RunArgs("run", PathOf("long.json"), "--quiet", "--output", PathOf("reference.json"));
        Assert.True(reference.Code == 0, reference.Stderr);

        var random = new MathNet.Numerics.Random.Xoshiro256StarStar(2026); // the test's own seeded moments, reproducible
        int killed = 0;
        for (int attempt = 0; attempt < 4 && killed < 2; attempt++)
        {
            string checkpoint = PathOf($"run{attempt}.checkpoint"), output = PathOf($"killed{attempt}.json");
            using var child = Start("run", PathOf("long.json"), "--quiet", "--output", output, "--checkpoint", checkpoint, "--checkpoint-every", "100ms");
            // The kill comes at a random moment after the first checkpoint.
            if (!WaitForFile(checkpoint, child, TimeSpan.FromSeconds(60)))
            {
                Assert.Fail("no checkpoint appeared: " + child.StandardError.ReadToEnd()); // read only now: ReadToEnd waits for the child to end
            }
            Thread.Sleep(TimeSpan.FromMilliseconds(20 + 1500 * random.NextDouble()));
            if (child.HasExited)
            {
                Assert.True(child.ExitCode == 0, child.StandardError.ReadToEnd());
                continue; // finished before the kill: try another moment
            }
            child.Kill(entireProcessTree: true); // SIGKILL on Unix: no handler runs, nothing is flushed
            child.WaitForExit();
            killed++;
            Assert.False(File.Exists(output), "a killed run must not have written its report");
            var resumed = RunArgs("resume", checkpoint, "--quiet");
            Assert.True(resumed.Code == 0, resumed.Stderr);
            Assert.Equal(File.ReadAllText(PathOf("reference.json")), File.ReadAllText(output));
        }
        Assert.True(killed >= 1, "the run always finished before it could be killed");
    }

    [Fact]
    public void Ctrl_C_stops_a_real_process_promptly_and_leaves_a_checkpoint_that_resumes_exactly()
    {
        if (!RuntimeInformation.IsOSPlatform(OSPlatform.Linux) && !RuntimeInformation.IsOSPlatform(OSPlatform.OSX))
        {
            return; // SIGINT to a child process is a Unix facility; Windows consoles deliver Ctrl+C differently
        }
        File.WriteAllText(PathOf("long.json"), LongScenario);
        var reference = RunArgs("run", PathOf("long.json"), "--quiet");
        Assert.True(reference.Code == 0, reference.Stderr);
        string checkpoint = PathOf("interrupted.checkpoint");
        using var child = Start("run", PathOf("long.json"), "--quiet", "--checkpoint", checkpoint, "--checkpoint-every", "5m");
        Assert.True(WaitForFile(checkpoint, child, TimeSpan.FromSeconds(60)), "no checkpoint appeared");
        Thread.Sleep(100);
        Assert.False(child.HasExited, "the run finished before Ctrl+C");
        var clock = Stopwatch.StartNew();
        Assert.Equal(0, Kill(child.Id, 2)); // SIGINT, what Ctrl+C sends
        string stderr = child.StandardError.ReadToEnd();
        child.WaitForExit();
        clock.Stop();
        Assert.Equal(Program.Failure, child.ExitCode);
        Assert.Contains("thermal-sampling resume", stderr);
        Assert.Equal("", child.StandardOutput.ReadToEnd());
        // The stop includes writing the checkpoint and the process exit; the library's own stop is tested in CheckpointTests.
        Assert.True(clock.ElapsedMilliseconds < 2000, $"the process took {clock.ElapsedMilliseconds} ms to stop");
        var resumed = RunArgs("resume", checkpoint, "--quiet");
        Assert.True(resumed.Code == 0, resumed.Stderr);
        Assert.Equal(reference.Stdout, resumed.Stdout);
    }

    [DllImport("libc", EntryPoint = "kill", SetLastError = true)]
    private static extern int Kill(int pid, int signal);

    [Fact]
    public void Resume_takes_new_output_options_and_refuses_ones_the_run_did_not_prepare_for()
    {
        File.WriteAllText(PathOf("short.json"), ShortScenario);
        var json = RunArgs("run", PathOf("short.json"), "--quiet");
        var table = RunArgs("run", PathOf("short.json"), "--quiet", "--format", "table");
        string checkpoint = PathOf("short.checkpoint");
        var checkpointed = RunArgs("run", PathOf("short.json"), "--quiet", "--checkpoint", checkpoint, "--checkpoint-every", "1s");
        Assert.True(checkpointed.Code == 0, checkpointed.Stderr);
        Assert.Equal(json.Stdout, checkpointed.Stdout);
        Assert.Equal(json.Stdout, RunArgs("resume", checkpoint, "--quiet").Stdout);
        Assert.Equal(table.Stdout, RunArgs("resume", checkpoint, "--quiet", "--format", "table").Stdout);
        Assert.Equal(json.Stdout, RunArgs("resume", checkpoint, "--quiet", "--threads", "1").Stdout);

        var samples = RunArgs("resume", checkpoint, "--quiet", "--samples", PathOf("draws.csv"));
        Assert.Equal(Program.InvalidInput, samples.Code);
        Assert.Contains("started without --samples", samples.Stderr);
        Assert.Contains("--seed cannot change on resume", RunArgs("resume", checkpoint, "--seed", "3").Stderr);
        Assert.Contains("--checkpoint belongs to run and sweep", RunArgs("validate", PathOf("short.json"), "--checkpoint", checkpoint).Stderr);
        Assert.Contains("needs --checkpoint FILE", RunArgs("run", PathOf("short.json"), "--checkpoint-every", "5m").Stderr);
        foreach (string bad in new[] { "5", "-3s", "0s", "2d", "25h", "1.5.2m", "s" })
        {
            var r = RunArgs("run", PathOf("short.json"), "--checkpoint", checkpoint, "--checkpoint-every", bad);
            Assert.Equal(Program.InvalidInput, r.Code);
            Assert.Contains($"--checkpoint-every '{bad}' is not a duration", r.Stderr);
        }
        var noFolder = RunArgs("run", PathOf("short.json"), "--checkpoint", PathOf(Path.Combine("missing", "x.checkpoint")));
        Assert.Equal(Program.InvalidInput, noFolder.Code);
        Assert.Contains("does not exist", noFolder.Stderr);

        // A damaged checkpoint: exit 2, the reason, no stack trace.
        var bytes = File.ReadAllBytes(checkpoint);
        File.WriteAllBytes(PathOf("cut.checkpoint"), bytes[..(bytes.Length / 2)]);
        var cut = RunArgs("resume", PathOf("cut.checkpoint"));
        Assert.Equal(Program.InvalidInput, cut.Code);
        Assert.Contains("cut short", cut.Stderr);
        Assert.DoesNotContain("   at ", cut.Stderr);
        File.WriteAllText(PathOf("scenario-as-checkpoint"), ShortScenario);
        Assert.Contains("not", RunArgs("resume", PathOf("scenario-as-checkpoint")).Stderr);
        Assert.Equal(Program.InvalidInput, RunArgs("resume", PathOf("nothing-here")).Code);
    }

    [Fact]
    public void A_sweep_checkpoint_resumes_the_sweep()
    {
        File.WriteAllText(PathOf("short.json"), ShortScenario);
        var plain = RunArgs("sweep", PathOf("short.json"), "--from", "50", "--to", "250", "--count", "3", "--quiet", "--format", "csv");
        string checkpoint = PathOf("sweep.checkpoint");
        var first = RunArgs("sweep", PathOf("short.json"), "--from", "50", "--to", "250", "--count", "3", "--quiet", "--format", "csv", "--checkpoint", checkpoint);
        Assert.Equal(plain.Stdout, first.Stdout);
        Assert.Equal(plain.Stdout, RunArgs("resume", checkpoint, "--quiet").Stdout);
    }
}
