using System.Runtime.InteropServices;

namespace PulseLadder.Storage;

/// <summary>
/// The few SQLite C functions the bulk insert calls per row, as unmanaged function pointers on raw handles. Through
/// SQLitePCLRaw each call goes through an interface, adds and releases a reference on the statement's SafeHandle
/// (two interlocked operations) and switches the thread's GC mode; at ten binds per row that was a sizeable part of
/// the insert (docs/PERFORMANCE.md, "Ingest (session 5)"). The pointers come from the library SQLitePCLRaw's
/// e_sqlite3 provider itself loads (same name, same assembly's search rules), so they act on the same connection.
/// </summary>
internal static unsafe class SqliteDirect
{
    /// <summary>SQLite's SQLITE_TRANSIENT destructor value: SQLite copies the bytes before the call returns.</summary>
    public const nint Transient = -1;

    /// <summary>SQLITE_STATIC: the caller keeps the bytes alive and unchanged while they are bound.</summary>
    public const nint Static = 0;

    // Binds run a few hundred instructions, take no lock another thread could hold for long (the connection is used by
    // this thread only) and never call back into .NET: the GC-mode switch is skipped for them. Step, reset and prepare
    // can run long (page writes, a busy wait) and keep it.
    public static readonly delegate* unmanaged[Cdecl]<nint, byte*, int, nint*, nint, int> Prepare;
    public static readonly delegate* unmanaged[Cdecl, SuppressGCTransition]<nint, int, long, int> BindInt64;
    public static readonly delegate* unmanaged[Cdecl, SuppressGCTransition]<nint, int, double, int> BindDouble;
    public static readonly delegate* unmanaged[Cdecl, SuppressGCTransition]<nint, int, byte*, int, nint, int> BindText;
    public static readonly delegate* unmanaged[Cdecl, SuppressGCTransition]<nint, int, int> BindNull;
    public static readonly delegate* unmanaged[Cdecl]<nint, int> Step;
    public static readonly delegate* unmanaged[Cdecl]<nint, int> Reset;
    public static readonly delegate* unmanaged[Cdecl]<nint, int> Finalize;

    static SqliteDirect()
    {
        nint lib = NativeLibrary.Load("e_sqlite3", typeof(SQLitePCL.SQLite3Provider_e_sqlite3).Assembly, null);
        Prepare = (delegate* unmanaged[Cdecl]<nint, byte*, int, nint*, nint, int>)NativeLibrary.GetExport(lib, "sqlite3_prepare_v2");
        BindInt64 = (delegate* unmanaged[Cdecl, SuppressGCTransition]<nint, int, long, int>)NativeLibrary.GetExport(lib, "sqlite3_bind_int64");
        BindDouble = (delegate* unmanaged[Cdecl, SuppressGCTransition]<nint, int, double, int>)NativeLibrary.GetExport(lib, "sqlite3_bind_double");
        BindText = (delegate* unmanaged[Cdecl, SuppressGCTransition]<nint, int, byte*, int, nint, int>)NativeLibrary.GetExport(lib, "sqlite3_bind_text");
        BindNull = (delegate* unmanaged[Cdecl, SuppressGCTransition]<nint, int, int>)NativeLibrary.GetExport(lib, "sqlite3_bind_null");
        Step = (delegate* unmanaged[Cdecl]<nint, int>)NativeLibrary.GetExport(lib, "sqlite3_step");
        Reset = (delegate* unmanaged[Cdecl]<nint, int>)NativeLibrary.GetExport(lib, "sqlite3_reset");
        Finalize = (delegate* unmanaged[Cdecl]<nint, int>)NativeLibrary.GetExport(lib, "sqlite3_finalize");
    }
}
