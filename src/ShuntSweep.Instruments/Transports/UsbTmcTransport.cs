using System.Globalization;
using ShuntSweep.Instruments.Resources;

namespace ShuntSweep.Instruments.Transports;

/// <summary>Opens a USB test-and-measurement device through the Linux usbtmc driver's character device (<c>/dev/usbtmcN</c>).</summary>
/// <remarks>The kernel driver frames each write as one USBTMC message; reads return the device's answer. Which /dev/usbtmcN belongs to a vendor/product/serial is found in sysfs.</remarks>
internal static class UsbTmcTransport
{
    private const string SysClass = "/sys/class/usbmisc";

    /// <summary>Opens the device file of <paramref name="address"/>, or <paramref name="device"/> when the bench file names it.</summary>
    public static ITransport Open(UsbTmcAddress address, string? device)
    {
        var path = device ?? Find(address, SysClass)
            ?? throw new IOException($"no /dev/usbtmcN belongs to USB device {address.VendorId:X4}:{address.ProductId:X4}{(address.SerialNumber is null ? string.Empty : $" serial {address.SerialNumber}")}; is the usbtmc kernel module loaded and the device plugged in? (the bench file can name the device file with 'device:')");
        var stream = new FileStream(path, FileMode.Open, FileAccess.ReadWrite, FileShare.ReadWrite, bufferSize: 0, useAsync: false);
        return new StreamTransport(address.Text, stream);
    }

    /// <summary>Finds the usbtmc device file whose USB device matches <paramref name="address"/>, looking under <paramref name="sysClass"/>.</summary>
    internal static string? Find(UsbTmcAddress address, string sysClass)
    {
        if (!Directory.Exists(sysClass))
        {
            return null;
        }

        foreach (var entry in Directory.EnumerateDirectories(sysClass, "usbtmc*").Order(StringComparer.Ordinal))
        {
            // device -> the USB interface; its parent directory is the USB device with idVendor, idProduct and serial.
            // The link must be resolved first: a lexical "device/.." would just come back to the class entry.
            var link = new DirectoryInfo(Path.Combine(entry, "device"));
            var usbInterface = link.ResolveLinkTarget(returnFinalTarget: true)?.FullName ?? link.FullName;
            var usbDevice = Path.GetDirectoryName(usbInterface.TrimEnd('/'));
            if (usbDevice is null)
            {
                continue;
            }

            if (Hex(Path.Combine(usbDevice, "idVendor")) == address.VendorId
                && Hex(Path.Combine(usbDevice, "idProduct")) == address.ProductId
                && (address.SerialNumber is null || string.Equals(Read(Path.Combine(usbDevice, "serial")), address.SerialNumber, StringComparison.Ordinal)))
            {
                return Path.Combine("/dev", Path.GetFileName(entry));
            }
        }

        return null;
    }

    private static string? Read(string path) => File.Exists(path) ? File.ReadAllText(path).Trim() : null;

    private static int? Hex(string path) =>
        Read(path) is { } text && int.TryParse(text, NumberStyles.AllowHexSpecifier, CultureInfo.InvariantCulture, out var v) ? v : null;
}
