//! The formatter shared by `stoik fmt` and the language server.
