using ShuntSweep.Cli;

return await ShuntSweepCommandLine.Create().Parse(args).InvokeAsync();
