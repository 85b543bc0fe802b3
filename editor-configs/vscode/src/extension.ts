// Starts `calami serve` over stdio and connects it to VS Code. All checking,
// quick fixes and word-list edits happen in the server; this file only
// launches it, passes settings through and explains start-up failures.
import { ChildProcess, spawn } from "child_process";
import * as vscode from "vscode";
import {
  CloseAction,
  CloseHandlerResult,
  ErrorAction,
  ErrorHandler,
  LanguageClient,
  LanguageClientOptions,
  ServerOptions,
} from "vscode-languageclient/node";
import { FatalLineCollector } from "./fatalLine";
import { CHECKED_LANGUAGES } from "./languages";
import { missingProgramMessage, resolveExecutable } from "./serverCommand";
import { serverSettings } from "./serverSettings";

/** The exit code calami uses for a user-facing error (see calami/cli.py). */
const USER_ERROR_EXIT_CODE = 2;

let client: LanguageClient | undefined;
let serverProcess: ChildProcess | undefined;
let wordListWatcher: vscode.FileSystemWatcher | undefined;
let output: vscode.OutputChannel;

export async function activate(context: vscode.ExtensionContext): Promise<void> {
  output = vscode.window.createOutputChannel("Calami");
  context.subscriptions.push(
    output,
    vscode.commands.registerCommand("calami.restartServer", () => restart()),
    vscode.commands.registerCommand("calami.showServerLog", () => output.show(true)),
    vscode.workspace.onDidChangeConfiguration((event) => {
      // The server picks up its own settings through workspace/configuration;
      // only a different program or model needs a new process (and a new
      // word-list name needs a new file watcher).
      if (
        event.affectsConfiguration("calami.serverPath") ||
        event.affectsConfiguration("calami.serverArgs") ||
        event.affectsConfiguration("calami.modelPath") ||
        event.affectsConfiguration("calami.wordList")
      ) {
        void restart();
      }
    }),
  );
  await start();
}

export async function deactivate(): Promise<void> {
  await stop();
}

async function restart(): Promise<void> {
  await stop();
  await start();
}

async function stop(): Promise<void> {
  const running = client;
  client = undefined;
  if (running) {
    try {
      await running.stop(2000);
    } catch {
      // The server may already be gone; nothing to clean up then.
    }
  }
  if (serverProcess && serverProcess.exitCode === null) {
    serverProcess.kill();
  }
  serverProcess = undefined;
  wordListWatcher?.dispose();
  wordListWatcher = undefined;
}

async function start(): Promise<void> {
  const stderrLines = new FatalLineCollector();
  let exitCode: number | null | undefined;
  let exited: Promise<void> = Promise.resolve();
  let reported = false;

  const report = (message: string): void => {
    if (reported) {
      return;
    }
    reported = true;
    output.appendLine(message);
    void vscode.window.showErrorMessage(message, "Open Settings", "Show Log").then((choice) => {
      if (choice === "Open Settings") {
        void vscode.commands.executeCommand("workbench.action.openSettings", "calami.");
      } else if (choice === "Show Log") {
        output.show(true);
      }
    });
  };

  const serverOptions: ServerOptions = async () => {
    const config = vscode.workspace.getConfiguration("calami");
    const program = config.get<string>("serverPath") || "calami";
    const args = config.get<string[]>("serverArgs") ?? ["serve"];
    const executable = resolveExecutable(program);
    if (!executable) {
      const message = missingProgramMessage(program);
      report(message);
      throw new Error(message);
    }
    output.appendLine(`Starting ${executable} ${args.join(" ")}`);
    const child = spawn(executable, args, {
      cwd: vscode.workspace.workspaceFolders?.[0]?.uri.fsPath,
      env: process.env,
      stdio: "pipe",
    });
    serverProcess = child;
    child.stderr.setEncoding("utf8");
    child.stderr.on("data", (chunk: string) => stderrLines.push(chunk));
    exited = new Promise((resolve) => {
      child.on("exit", (code) => {
        exitCode = code;
        resolve();
      });
      child.on("error", (error) => {
        report(`calami: could not start '${executable}': ${error.message}; check calami.serverPath.`);
        resolve();
      });
    });
    return child;
  };

  // Filled in once the client exists: its default handler restarts a server
  // that crashed, which is right for everything but a start-up error.
  let fallback: ErrorHandler | undefined;
  const errorHandler: ErrorHandler = {
    error: (error, message, count) =>
      fallback ? fallback.error(error, message, count) : { action: ErrorAction.Shutdown },
    closed: async (): Promise<CloseHandlerResult> => {
      // Give the exit event a moment: stdout may close before it arrives.
      await Promise.race([exited, new Promise((resolve) => setTimeout(resolve, 2000))]);
      const fatal = stderrLines.lastFatalLine();
      if (exitCode === USER_ERROR_EXIT_CODE && fatal) {
        // A missing model or a bad setting: restarting would fail the same way.
        report(fatal);
        return { action: CloseAction.DoNotRestart, handled: true };
      }
      return fallback ? fallback.closed() : { action: CloseAction.DoNotRestart };
    },
  };

  // Project config and lexicon changes (a teammate's `git pull`) reach the
  // server as workspace/didChangeWatchedFiles.
  // calami-words.txt is the lexicon's old name, still read by the server.
  const wordList = vscode.workspace.getConfiguration("calami").get<string>("wordList") || "calami-lexicon.txt";
  const wordListName = wordList.split(/[\\/]/).pop() || "calami-lexicon.txt";
  const watched = Array.from(new Set(["calami.toml", "pyproject.toml", "calami-lexicon.txt", "calami-words.txt", wordListName]));
  wordListWatcher = vscode.workspace.createFileSystemWatcher(`**/{${watched.join(",")}}`);

  const clientOptions: LanguageClientOptions = {
    documentSelector: CHECKED_LANGUAGES.flatMap((language) => [
      { scheme: "file", language },
      { scheme: "untitled", language },
    ]),
    initializationOptions: serverSettings((key) => vscode.workspace.getConfiguration("calami").get(key)),
    synchronize: {
      configurationSection: "calami",
      fileEvents: wordListWatcher,
    },
    outputChannel: output,
    diagnosticCollectionName: "calami",
    errorHandler,
  };

  const created = new LanguageClient("calami", "Calami", serverOptions, clientOptions);
  fallback = created.createDefaultErrorHandler(4);
  client = created;
  try {
    await created.start();
  } catch (error) {
    const fatal = stderrLines.lastFatalLine();
    if (fatal) {
      report(fatal);
    } else if (!reported) {
      output.appendLine(`calami: the server did not start: ${String(error)}`);
    }
  }
}
