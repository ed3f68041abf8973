using ShuntSweep.Core.Bench;

namespace ShuntSweep.Instruments.Tests.Support;

/// <summary>Writes an invented bench file around given instrument mappings and reads it with the real bench reader.</summary>
internal static class TestBench
{
    public static BenchDescription Load(string instrumentsYaml, string? extraFile = null, string? extraText = null)
    {
        var dir = Directory.CreateTempSubdirectory("shuntsweep-bench-").FullName;
        if (extraFile is not null)
        {
            File.WriteAllText(Path.Combine(dir, extraFile), extraText);
        }

        var path = Path.Combine(dir, "bench.yaml");
        File.WriteAllText(path, $"""
            bench: invented test bench
            uut:
              manufacturer: Nowhere Instruments
              model: NM-10
              serial: T-0001
              jacks:
                - name: mA
                  fuseRating: 400 mA
              ranges:
                - name: 60mA
                  jack: mA
                  fullScale: 60 mA
                  resolution: 10 uA
                  accuracy:
                    reading: 0.005
                    counts: 2
            supply:
              voltage: 5 V
              currentLimit: 0.5 A
            load:
              minimumVoltage: 0.5 V
              maxCurrent: 1 A
            instruments:
            {instrumentsYaml}
            """);
        return BenchReader.Load(path);
    }
}
