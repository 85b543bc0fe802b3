//! Zed extension that starts the calami language server (`calami serve`).
//! The server does all the work; this only finds the program and passes the
//! user's `lsp.calami` settings through.
use zed_extension_api::{self as zed, settings::LspSettings, LanguageServerId, Result};

struct CalamiExtension;

impl zed::Extension for CalamiExtension {
    fn new() -> Self {
        CalamiExtension
    }

    fn language_server_command(
        &mut self,
        language_server_id: &LanguageServerId,
        worktree: &zed::Worktree,
    ) -> Result<zed::Command> {
        let binary = LspSettings::for_worktree(language_server_id.as_ref(), worktree)
            .ok()
            .and_then(|settings| settings.binary);
        let configured_path = binary.as_ref().and_then(|b| b.path.clone());
        let args = binary
            .as_ref()
            .and_then(|b| b.arguments.clone())
            .unwrap_or_else(|| vec!["serve".to_string()]);
        let command = match configured_path {
            Some(path) => path,
            None => worktree.which("calami").ok_or_else(|| {
                "calami: the server program 'calami' was not found on PATH; install calami \
                 (for example `pipx install calami`) or set lsp.calami.binary.path in Zed's settings"
                    .to_string()
            })?,
        };
        Ok(zed::Command {
            command,
            args,
            env: worktree.shell_env(),
        })
    }

    fn language_server_initialization_options(
        &mut self,
        language_server_id: &LanguageServerId,
        worktree: &zed::Worktree,
    ) -> Result<Option<zed::serde_json::Value>> {
        Ok(LspSettings::for_worktree(language_server_id.as_ref(), worktree)
            .ok()
            .and_then(|settings| settings.initialization_options))
    }

    fn language_server_workspace_configuration(
        &mut self,
        language_server_id: &LanguageServerId,
        worktree: &zed::Worktree,
    ) -> Result<Option<zed::serde_json::Value>> {
        Ok(LspSettings::for_worktree(language_server_id.as_ref(), worktree)
            .ok()
            .and_then(|settings| settings.settings))
    }
}

zed::register_extension!(CalamiExtension);
