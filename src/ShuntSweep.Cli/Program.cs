using System.CommandLine;
using ShuntSweep.Cli;

JitProfile.Start(args);

// Ctrl-C and SIGTERM cancel the running command's token; the runner then turns the outputs off (load, then supply,
// confirmed by query) before the process ends. The timeout bounds how long that may take.
var invocation = new InvocationConfiguration { ProcessTerminationTimeout = TimeSpan.FromSeconds(20) };
return await ShuntSweepCommandLine.InvokeAsync(args, invocation);
