namespace Spatial.Testing;

/// <summary>Locates test data copied beside the test assembly (each test project's <c>data/</c> folder) and scratch folders.</summary>
public static class TestData
{
    /// <summary>Full path of <paramref name="relative"/> under the test project's <c>data/</c> folder.</summary>
    public static string Path(params string[] relative) =>
        System.IO.Path.Combine([AppContext.BaseDirectory, "data", .. relative]);

    /// <summary>A new empty scratch folder under the system temp folder; the caller deletes it.</summary>
    public static string NewScratchFolder(string label)
    {
        var dir = System.IO.Path.Combine(System.IO.Path.GetTempPath(), "spatial-tests", $"{label}-{Guid.NewGuid():N}");
        Directory.CreateDirectory(dir);
        return dir;
    }
}

/// <summary>
/// External programs used as real clients in tests (gdalinfo, ogrinfo, chromium). On a user's machine
/// without them such a test is skipped with a message; in CI, where <c>SPATIAL_REQUIRE_TOOLS=1</c> is
/// set by <c>.ci/run</c>, a missing tool is a failure.
/// </summary>
public static class ExternalTool
{
    /// <summary>True when CI demands every external tool.</summary>
    public static bool Required => Environment.GetEnvironmentVariable("SPATIAL_REQUIRE_TOOLS") == "1";

    /// <summary>Full path of <paramref name="name"/> on PATH, or null.</summary>
    public static string? Find(string name)
    {
        foreach (var dir in (Environment.GetEnvironmentVariable("PATH") ?? string.Empty).Split(System.IO.Path.PathSeparator))
        {
            if (dir.Length == 0)
            {
                continue;
            }

            var candidate = System.IO.Path.Combine(dir, name);
            if (File.Exists(candidate))
            {
                return candidate;
            }
        }

        return null;
    }

    /// <summary>
    /// Returns the tool's path, or null when it is absent and not required (the test should then return early,
    /// after writing why through <paramref name="skipReason"/>). Throws when absent and required.
    /// </summary>
    public static string? Locate(string name, out string skipReason)
    {
        var path = Find(name);
        if (path is not null)
        {
            skipReason = string.Empty;
            return path;
        }

        if (Required)
        {
            throw new InvalidOperationException($"'{name}' is required (SPATIAL_REQUIRE_TOOLS=1) but is not on PATH; .ci/run should have installed it.");
        }

        skipReason = $"'{name}' is not installed; install it (Debian: see .ci/run) to run this check.";
        return null;
    }

    /// <summary>Runs a program and returns its exit code, standard output and standard error.</summary>
    public static (int ExitCode, string StdOut, string StdErr) Run(string program, params string[] args)
    {
        var psi = new System.Diagnostics.ProcessStartInfo(program)
        {
            RedirectStandardOutput = true,
            RedirectStandardError = true,
            UseShellExecute = false,
        };
        foreach (var a in args)
        {
            psi.ArgumentList.Add(a);
        }

        using var p = System.Diagnostics.Process.Start(psi)!;
        var stdout = p.StandardOutput.ReadToEndAsync();
        var stderr = p.StandardError.ReadToEndAsync();
        p.WaitForExit();
        return (p.ExitCode, stdout.Result, stderr.Result);
    }
}
