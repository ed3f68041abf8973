using System.CommandLine;
using ShuntSweep.Cli.Composition;
using ShuntSweep.Core.Bench;
using ShuntSweep.Core.Documents;
using ShuntSweep.Instruments;
using ShuntSweep.Instruments.Profiles;
using Spectre.Console;

namespace ShuntSweep.Cli.Commands;

/// <summary><c>shuntsweep check-profile</c>: reads profiles and checks them against what their role needs, without touching an instrument.</summary>
/// <remarks>Every problem is given at its file, line and column; <c>probe --bench</c> then proves the read-only queries against the live instrument.</remarks>
internal static class CheckProfileCommand
{
    private static readonly string[] RoleSections = ["supply", "load", "voltmeter", "uut", "reference"];

    public static Command Create()
    {
        var profilesArg = new Argument<string[]>("profile") { Description = "Profile files to read and list.", Arity = ArgumentArity.ZeroOrMore };
        var benchOpt = new Option<string?>("--bench") { Description = "Check the profile of every instrument of this bench file against its role and the UUT's ranges." };
        var roleOpt = new Option<string?>("--role") { Description = "Check the profile files given against this section's needs: supply, load, voltmeter, uut or reference." };
        var command = new Command("check-profile", "Read instrument profiles and check that each has every operation its role needs (offline: no instrument is opened).")
        {
            profilesArg, benchOpt, roleOpt,
        };
        command.SetAction((parse, _) => Terminal.GuardAsync(() => Task.FromResult(Run(parse.GetValue(profilesArg) ?? [], parse.GetValue(benchOpt), parse.GetValue(roleOpt)))));
        return command;
    }

    private static int Run(string[] files, string? benchPath, string? role)
    {
        if (role is not null && !RoleSections.Contains(role))
        {
            return Terminal.Fail($"--role: '{role}' is not one of {string.Join(", ", RoleSections)}.", ExitCodes.InvalidInput);
        }

        if (files.Length == 0 && benchPath is null)
        {
            return Terminal.Fail("nothing to check: give profile files or --bench BENCH.", ExitCodes.InvalidInput);
        }

        var problems = new List<DocumentException>();
        foreach (var file in files)
        {
            var profile = InstrumentProfile.Load(file, Directory.GetCurrentDirectory());
            Describe(profile, role is null ? RoleSections : [role]);
            if (role is not null)
            {
                problems.AddRange(ProfileRequirements.Check(profile, role));
            }
        }

        if (benchPath is not null)
        {
            var bench = BenchReader.Load(BenchHost.Locate(benchPath));
            var baseDirectory = Path.GetDirectoryName(Path.GetFullPath(bench.File));
            foreach (var entry in bench.Instruments.Values.OrderBy(e => e.Role))
            {
                var settings = DriverSettings.Read(entry.Settings, baseDirectory, entry.Role);
                if (settings.TypedByOperator || settings.StreamedReading is not null)
                {
                    continue;
                }

                var profile = InstrumentProfile.Load(settings.Profile, baseDirectory);
                var section = ProfileRequirements.SectionOf(entry.Role, settings.Shunt is not null);
                var found = ProfileRequirements.Check(profile, section, entry.Role == InstrumentRole.UutMeter ? bench.Uut.Ranges : null);
                AnsiConsole.MarkupLineInterpolated($"{BenchReader.KeyOf(entry.Role)}: profile '{profile.Name}' (version {profile.Version}, {section} section): {(found.Count == 0 ? "has every operation its role needs" : $"{found.Count} problem(s)")}");
                problems.AddRange(found);
            }
        }

        foreach (var p in problems)
        {
            Terminal.Fail(p.Message, ExitCodes.InvalidInput);
        }

        return problems.Count == 0 ? ExitCodes.Success : ExitCodes.InvalidInput;
    }

    private static void Describe(InstrumentProfile profile, IReadOnlyList<string> sections)
    {
        AnsiConsole.MarkupLineInterpolated($"profile '{profile.Name}' (version {profile.Version}, {profile.Source}): errors {profile.Errors.Mode.ToString().ToLowerInvariant()}{(profile.Errors.CanAsk ? $" by '{profile.Errors.Query}'" : ", settings checked by read-back")}; identity {(profile.HasIdentity ? $"'{profile.Query("common.identify")}'" : "none")}; inter-command delay {profile.InterCommandDelay.TotalMilliseconds} ms");
        var table = new Table().AddColumns("operation", "sends", "needed");
        foreach (var op in profile.Operations.Values.Where(o => sections.Contains(InstrumentProfile.Section(o.Key)) || o.Key.StartsWith("common.", StringComparison.Ordinal)))
        {
            var required = ProfileRequirements.Required(InstrumentProfile.Section(op.Key)).Any(r => r.Operation == op.Key);
            table.AddRow(
                Markup.Escape(op.Key),
                op.IsSupported ? Markup.Escape(string.Join("; ", op.Templates)) : "[grey](empty)[/]",
                required ? (op.IsSupported ? "required" : "[red]required, missing[/]") : "optional");
        }

        AnsiConsole.Write(table);
    }
}
