namespace TaskPhrase.Registry;

/// <summary>Why an index file was refused (see <see cref="IndexException.Kind"/>).</summary>
public enum IndexErrorKind
{
    /// <summary>The file does not exist.</summary>
    NotFound = 0,

    /// <summary>The file exists but cannot be read.</summary>
    Unreadable = 1,

    /// <summary>The file is not a TaskPhrase index (wrong magic bytes, or too small to be one).</summary>
    NotAnIndex = 2,

    /// <summary>The index was written in a format version this library does not read.</summary>
    UnsupportedVersion = 3,

    /// <summary>The file is damaged or truncated: a checksum, length, offset or the header does not check out.</summary>
    Corrupt = 4,

    /// <summary>The index was built with another embedding model than the one in use.</summary>
    ModelMismatch = 5,

    /// <summary>The index was built from another registry than the one expected.</summary>
    RegistryMismatch = 6,
}
