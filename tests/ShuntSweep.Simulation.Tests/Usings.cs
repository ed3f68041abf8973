global using Xunit;
global using ShuntSweep.Core.Timing;
