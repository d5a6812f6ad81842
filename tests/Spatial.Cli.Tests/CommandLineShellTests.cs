using Spatial.Cli;
using Xunit;

namespace Spatial.Cli.Tests;

/// <summary>The command-line shell: exit codes and help, as documented in the README.</summary>
public sealed class CommandLineShellTests
{
    private static (int Code, string Out, string Err) Run(params string[] args) => CliHarness.Run(args);

    [Fact]
    public void Version_is_printed_and_exit_code_is_zero()
    {
        var (code, output, _) = Run("--version");

        Assert.Equal(ExitCodes.Done, code);
        Assert.Matches(@"^\d+\.\d+\.\d+", output.Trim());
    }

    [Fact]
    public void Help_lists_the_tool_and_exits_zero()
    {
        var (code, output, _) = Run("--help");

        Assert.Equal(ExitCodes.Done, code);
        Assert.Contains("spatial", output, StringComparison.Ordinal);
    }

    [Fact]
    public void An_unknown_verb_is_bad_usage_with_exit_code_two_and_no_stack_trace()
    {
        var (code, _, error) = Run("no-such-verb");

        Assert.Equal(ExitCodes.BadUsage, code);
        Assert.Contains("no-such-verb", error, StringComparison.Ordinal);
        Assert.DoesNotContain("   at ", error, StringComparison.Ordinal);
    }

    [Fact]
    public void Exit_codes_are_the_documented_numbers()
    {
        // The README documents 0 done, 1 bad input, 2 bad usage, 3 internal fault.
        Assert.Equal(0, ExitCodes.Done);
        Assert.Equal(1, ExitCodes.BadInput);
        Assert.Equal(2, ExitCodes.BadUsage);
        Assert.Equal(3, ExitCodes.InternalFault);
    }
}
