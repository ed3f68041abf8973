using System.Text;

namespace ShuntSweep.Simulation.Scpi;

/// <summary>A simulated instrument's SCPI front: common commands, status registers and error queue (IEEE 488.2 §10, §11), and its own command set.</summary>
/// <remarks>Thread-safe: lines are executed one at a time per instrument, whichever connection they come from.</remarks>
internal sealed class ScpiInstrument : IInstrumentFront, IDisposable
{
    /// <summary>The error queue depth; on overflow the newest entry becomes -350 (SCPI-99 vol. 2 §21.8.2).</summary>
    public const int QueueCapacity = 20;

    /// <summary>The most distinct lines remembered with their matched headers.</summary>
    private const int MaxRemembered = 256;

    private readonly Queue<(int Code, string? Detail)> _errors = new();
    private readonly Dictionary<string, Step[]> _remembered = new(StringComparer.Ordinal);
    private readonly StringBuilder _response = new();
    private readonly SemaphoreSlim _turn = new(1, 1);
    private readonly Lock _status = new();
    private readonly Action _reset;
    private readonly Func<CancellationToken, ValueTask> _waitPending;
    private readonly Func<int> _questionable;
    private int _esr = StatusBits.PowerOn;
    private int _ese;
    private int _sre;

    /// <summary>Creates the instrument with its identity and device-specific commands.</summary>
    /// <param name="identity">The <c>*IDN?</c> answer: maker, model, serial, firmware.</param>
    /// <param name="commands">The device-specific command set; common commands are added here.</param>
    /// <param name="reset">Puts the device in its <c>*RST</c> state (outputs off).</param>
    /// <param name="waitPending">Waits until pending operations (an armed measurement) are complete, for <c>*OPC?</c> and <c>*WAI</c>.</param>
    /// <param name="questionable">The device's questionable condition, summarised in status byte bit 3.</param>
    public ScpiInstrument(string identity, ScpiCommandSet commands, Action reset, Func<CancellationToken, ValueTask>? waitPending = null, Func<int>? questionable = null)
    {
        ArgumentNullException.ThrowIfNull(commands);
        Identity = identity;
        Commands = commands;
        _reset = reset;
        _waitPending = waitPending ?? (_ => ValueTask.CompletedTask);
        _questionable = questionable ?? (() => 0);
        AddCommon();
    }

    /// <summary>The <c>*IDN?</c> answer.</summary>
    public string Identity { get; }

    /// <summary>The whole command set, common commands included.</summary>
    public ScpiCommandSet Commands { get; }

    /// <summary>Executes one program message (a line without its terminator); returns the response message, or null when nothing was queried.</summary>
    /// <remarks>A line whose every unit parsed and matched a header is remembered with its matches (up to <see cref="MaxRemembered"/> lines), so that
    /// the same line again (a settling poll's <c>INIT</c> and <c>FETC?</c>) runs its handlers without being parsed and matched again.</remarks>
    public async ValueTask<string?> ExecuteAsync(string line, CancellationToken cancellationToken)
    {
        await _turn.WaitAsync(cancellationToken);
        try
        {
            var response = _response.Clear();
            var queried = false;
            if (_remembered.TryGetValue(line, out var steps))
            {
                foreach (var step in steps)
                {
                    queried |= step.Unit.IsQuery;
                    if (!await RunAsync(step, response))
                    {
                        break;
                    }
                }

                return queried && response.Length > 0 ? response.ToString() : null;
            }

            var resolved = new List<Step>();
            var complete = true;
            IReadOnlyList<string> path = [];
            foreach (var text in ScpiParser.SplitUnits(line))
            {
                if (text.Trim(' ', '\t').Length == 0)
                {
                    if (line.Trim(' ', '\t').Length > 0)
                    {
                        // An empty unit between semicolons is a syntax error; an empty line is not.
                        Push(ScpiErrors.SyntaxError, "an empty message unit");
                        complete = false;
                    }

                    continue;
                }

                Step step;
                try
                {
                    var unit = ScpiParser.ParseUnit(text);
                    queried |= unit.IsQuery;
                    var found = Find(unit, path);
                    if (found is null)
                    {
                        Push(ScpiErrors.UndefinedHeader, string.Join(':', unit.Mnemonics) + (unit.IsQuery ? "?" : string.Empty));
                        complete = false;
                        break;
                    }

                    var (handler, suffixes, mnemonics) = found.Value;
                    if (!unit.IsCommon)
                    {
                        // SCPI-99 vol. 1 §6.2.4: the next unit continues from the parent node of this header.
                        path = mnemonics.Take(mnemonics.Count - 1).ToList();
                    }

                    step = new Step(handler, suffixes, unit with { Mnemonics = mnemonics });
                }
                catch (ScpiException ex)
                {
                    Push(ex.Code, ex.Detail);
                    complete = false;
                    if (ex.Code is <= -100 and > -200)
                    {
                        // After a command error the rest of the message is not executed: the parser cannot tell where it would resume.
                        break;
                    }

                    continue;
                }
                catch (Exception ex) when (ex is ArithmeticException or ArgumentException or InvalidOperationException or KeyNotFoundException)
                {
                    // A simulator bug must not take the session down: report it as a device-specific error and carry on.
                    Push(-300, ex.Message);
                    complete = false;
                    break;
                }

                resolved.Add(step);
                if (!await RunAsync(step, response))
                {
                    complete = false;
                    break;
                }
            }

            if (complete && _remembered.Count < MaxRemembered)
            {
                _remembered[line] = [.. resolved];
            }

            return queried && response.Length > 0 ? response.ToString() : null;
        }
        finally
        {
            _turn.Release();
        }
    }

    /// <summary>Runs one matched unit; false when the rest of the message must not run (a command error or a simulator bug).</summary>
    private async ValueTask<bool> RunAsync(Step step, StringBuilder response)
    {
        try
        {
            await step.Handler(new ScpiCall(step.Unit, step.Suffixes, response));
            return true;
        }
        catch (ScpiException ex)
        {
            Push(ex.Code, ex.Detail);

            // After a command error the rest of the message is not executed: the parser cannot tell where it would resume.
            return ex.Code is not (<= -100 and > -200);
        }
        catch (Exception ex) when (ex is ArithmeticException or ArgumentException or InvalidOperationException or KeyNotFoundException)
        {
            // A simulator bug must not take the session down: report it as a device-specific error and carry on.
            Push(-300, ex.Message);
            return false;
        }
    }

    /// <summary>Adds an error to the queue and sets its event status bit.</summary>
    public void Push(int code, string? detail = null)
    {
        lock (_status)
        {
            _esr |= ScpiErrors.EsrBit(code);
            if (_errors.Count >= QueueCapacity)
            {
                return;
            }

            _errors.Enqueue(_errors.Count == QueueCapacity - 1 ? (ScpiErrors.QueueOverflow, null) : (code, detail));
        }
    }

    /// <summary>The errors waiting in the queue, oldest first (for tests and the fault journal).</summary>
    public IReadOnlyList<int> PendingErrors()
    {
        lock (_status)
        {
            return _errors.Select(e => e.Code).ToList();
        }
    }

    /// <inheritdoc />
    public void Dispose() => _turn.Dispose();

    /// <summary>Resets the device as <c>*RST</c> does.</summary>
    public void Reset() => _reset();

    private (Func<ScpiCall, ValueTask> Handler, int[] Suffixes, IReadOnlyList<string> Mnemonics)? Find(ScpiMessageUnit unit, IReadOnlyList<string> path)
    {
        var mnemonics = unit.IsCommon ? ["*" + unit.Mnemonics[0]] : unit.Mnemonics;
        if (!unit.IsCommon && !unit.IsAbsolute && path.Count > 0)
        {
            var relative = path.Concat(unit.Mnemonics).ToList();
            if (Commands.Find(relative, unit.IsQuery) is { } r)
            {
                return (r.Handler, r.Suffixes, relative);
            }
        }

        // A header that does not continue the previous path is also tried from the root, as most instruments do.
        return Commands.Find(mnemonics, unit.IsQuery) is { } f ? (f.Handler, f.Suffixes, mnemonics) : null;
    }

    private int StatusByte()
    {
        lock (_status)
        {
            var stb = 0;
            if (_errors.Count > 0)
            {
                stb |= StatusBits.ErrorQueueNotEmpty;
            }

            if (_questionable() != 0)
            {
                stb |= StatusBits.QuestionableSummary;
            }

            if ((_esr & _ese) != 0)
            {
                stb |= StatusBits.EventSummary;
            }

            if ((stb & _sre & ~StatusBits.MasterSummary) != 0)
            {
                stb |= StatusBits.MasterSummary;
            }

            return stb;
        }
    }

    private void AddCommon()
    {
        Commands
            .Add("*IDN?", c =>
            {
                c.Expect(0, 0);
                c.Reply(Identity);
            })
            .Add("*RST", c =>
            {
                c.Expect(0, 0);
                _reset();
            })
            .Add("*CLS", c =>
            {
                c.Expect(0, 0);
                lock (_status)
                {
                    _errors.Clear();
                    _esr = 0;
                }
            })
            .Add("*OPC", async c =>
            {
                c.Expect(0, 0);
                await _waitPending(CancellationToken.None);
                lock (_status)
                {
                    _esr |= StatusBits.OperationComplete;
                }
            })
            .Add("*OPC?", async c =>
            {
                c.Expect(0, 0);
                await _waitPending(CancellationToken.None);
                c.Reply("1");
            })
            .Add("*WAI", async c =>
            {
                c.Expect(0, 0);
                await _waitPending(CancellationToken.None);
            })
            .Add("*ESR?", c =>
            {
                c.Expect(0, 0);
                lock (_status)
                {
                    c.Reply(_esr.ToString(System.Globalization.CultureInfo.InvariantCulture));
                    _esr = 0;
                }
            })
            .Add("*ESE", c =>
            {
                c.Expect(1, 1);
                _ese = (int)c.Number(0, ScpiUnit.None, 0, 255, 0);
            })
            .Add("*ESE?", c => c.Reply(_ese.ToString(System.Globalization.CultureInfo.InvariantCulture)))
            .Add("*SRE", c =>
            {
                c.Expect(1, 1);
                _sre = (int)c.Number(0, ScpiUnit.None, 0, 255, 0);
            })
            .Add("*SRE?", c => c.Reply(_sre.ToString(System.Globalization.CultureInfo.InvariantCulture)))
            .Add("*STB?", c =>
            {
                c.Expect(0, 0);
                c.Reply(StatusByte().ToString(System.Globalization.CultureInfo.InvariantCulture));
            })
            .Add("*TST?", c => c.Reply("0"))
            .Add("SYSTem:ERRor[:NEXT]?", c =>
            {
                c.Expect(0, 0);
                lock (_status)
                {
                    c.Reply(_errors.TryDequeue(out var e) ? ScpiErrors.Format(e.Code, e.Detail) : ScpiErrors.Format(0, null));
                }
            })
            .Add("SYSTem:ERRor:COUNt?", c =>
            {
                lock (_status)
                {
                    c.Reply(_errors.Count.ToString(System.Globalization.CultureInfo.InvariantCulture));
                }
            })
            .Add("SYSTem:VERSion?", c => c.Reply("1999.0"));
    }

    /// <summary>One unit of a line matched to its handler: the parsed unit with the matched header's mnemonics, and its numeric suffixes.</summary>
    private readonly record struct Step(Func<ScpiCall, ValueTask> Handler, int[] Suffixes, ScpiMessageUnit Unit);
}
