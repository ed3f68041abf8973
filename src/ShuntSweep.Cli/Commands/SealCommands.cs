using System.CommandLine;
using ShuntSweep.Cli.Composition;
using ShuntSweep.Reporting;
using Spectre.Console;

namespace ShuntSweep.Cli.Commands;

/// <summary><c>shuntsweep endorse DIR --by NAME</c> approves a run's record and seals its files; <c>shuntsweep verify DIR</c> checks that none
/// changed since.</summary>
internal static class SealCommands
{
    public static Command Endorse()
    {
        var dirArg = new Argument<string>("directory") { Description = "The run directory whose record is approved (it must hold result.json)." };
        var byOpt = new Option<string>("--by") { Description = "Who approves the record (printed in its approval block).", Required = true };
        var roleOpt = new Option<string?>("--role") { Description = "The approver's role or authorisation, for example 'technical manager'." };
        var command = new Command("endorse", "Approve a run's record: the report gets the approval block, and the SHA-256 of journal, events, manifest, result and report is recorded in approval.json.")
        {
            dirArg, byOpt, roleOpt,
        };
        command.SetAction((parse, _) => Terminal.GuardAsync(() =>
        {
            var dir = parse.GetValue(dirArg)!;
            if (!File.Exists(Path.Combine(dir, "result.json")))
            {
                return Task.FromResult(Terminal.Fail($"{dir} holds no result.json: there is no record to approve.", ExitCodes.InvalidInput));
            }

            if (string.IsNullOrWhiteSpace(parse.GetValue(byOpt)))
            {
                return Task.FromResult(Terminal.Fail("--by: give the approver's name.", ExitCodes.InvalidInput));
            }

            var approval = Approval.Approve(dir, parse.GetValue(byOpt)!.Trim(), parse.GetValue(roleOpt), TimeProvider.System);
            AnsiConsole.MarkupLineInterpolated($"Approved by {approval.Approver} at {approval.Time.UtcDateTime:yyyy-MM-dd'T'HH:mm:ss'Z'}; sealed {string.Join(", ", approval.Files.Select(f => f.Name))} in {Path.Combine(dir, Approval.FileName)}.");
            return Task.FromResult(ExitCodes.Success);
        }));
        return command;
    }

    public static Command Verify()
    {
        var dirArg = new Argument<string>("directory") { Description = "The run directory to check against its approval." };
        var command = new Command("verify", "Check that a run's sealed files are byte for byte as approved; exit 1 naming each change, or when the record was never approved.") { dirArg };
        command.SetAction((parse, _) => Terminal.GuardAsync(() =>
        {
            var dir = parse.GetValue(dirArg)!;
            if (!Directory.Exists(dir))
            {
                return Task.FromResult(Terminal.Fail($"There is no run directory at {dir}.", ExitCodes.InvalidInput));
            }

            if (Approval.Read(dir) is not { } approval)
            {
                return Task.FromResult(Terminal.Fail($"{dir} was not approved (no {Approval.FileName}): there is nothing to verify against.", ExitCodes.CheckFailed));
            }

            var changes = approval.Changes(dir);
            if (changes.Count > 0)
            {
                foreach (var c in changes)
                {
                    Terminal.Fail(c, ExitCodes.CheckFailed);
                }

                return Task.FromResult(Terminal.Fail($"The record in {dir} is NOT as {approval.Approver} approved it on {approval.Time.UtcDateTime:yyyy-MM-dd'T'HH:mm:ss'Z'}.", ExitCodes.CheckFailed));
            }

            AnsiConsole.MarkupLineInterpolated($"Verified: {approval.Files.Count} files as {approval.Approver} approved them on {approval.Time.UtcDateTime:yyyy-MM-dd'T'HH:mm:ss'Z'}.");
            return Task.FromResult(ExitCodes.Success);
        }));
        return command;
    }
}
