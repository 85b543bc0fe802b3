;;; calami-eglot.el --- The calami language server through Eglot  -*- lexical-binding: t; -*-

;; Works with Eglot 1.9 (Debian bookworm's elpa-eglot, Emacs 28) and the
;; Eglot built into Emacs 29 and later.
;;
;; Usage, in your init file:
;;   (add-to-list 'load-path "/path/to/editor-configs/emacs")
;;   (require 'calami-eglot)
;;   (calami-eglot-ensure)   ; start it in the modes below (see README.md)
;;
;; Eglot runs ONE server per major mode.  This file therefore claims the
;; prose modes (Markdown, reStructuredText, LaTeX, commit messages, and plain
;; text that no other server claims); source-code modes only when you list
;; them in `calami-eglot-source-modes', which replaces their usual server in
;; Eglot.  To run calami next to another server, use calami-lsp-mode.el.

;;; Code:

(require 'eglot)
(require 'cl-lib)

(defgroup calami-eglot nil
  "Context-aware spelling hints from the calami language server, via Eglot."
  :group 'eglot
  :prefix "calami-eglot-")

(defcustom calami-eglot-program '("calami" "serve")
  "The command that starts the calami server on standard input/output.
Use an absolute path when calami lives in a virtual environment that is
not on `exec-path'."
  :type '(repeat string))

(defcustom calami-eglot-settings
  '(:variant "any"
    :hintThreshold 0.5
    :confidentThreshold 0.95
    :severity (:nonword "information" :realword "hint")
    :maxSuggestions 5
    :checkStrings :json-false
    :debounceMs 150
    :modelPath ""
    :wordList "calami-lexicon.txt")
  "Settings for the calami server, a plist.
They are sent as initializationOptions, and as the answer when the server
asks for the configuration section \"calami\".  Write false as :json-false.
:variant is \"any\", \"en-US\" or \"en-GB\"; :hintThreshold is the probability
that a word is wrong needed for a hint; a fix above :confidentThreshold is
the preferred one; severities are \"error\", \"warning\", \"information\" or
\"hint\"; an empty :modelPath means the model shipped with calami."
  :type 'plist)

(defconst calami-eglot-prose-modes
  '((markdown-mode :language-id "markdown")
    (gfm-mode :language-id "markdown")
    (rst-mode :language-id "restructuredtext")
    (LaTeX-mode :language-id "latex")
    (latex-mode :language-id "latex")
    (plain-TeX-mode :language-id "tex")
    (plain-tex-mode :language-id "tex")
    (git-commit-mode :language-id "git-commit")
    (git-commit-ts-mode :language-id "git-commit"))
  "Prose modes that calami serves, with the LSP language id sent for each.")

(defconst calami-eglot-all-source-modes
  '((python-mode :language-id "python")
    (python-ts-mode :language-id "python")
    (js-mode :language-id "javascript")
    (js-ts-mode :language-id "javascript")
    (typescript-mode :language-id "typescript")
    (typescript-ts-mode :language-id "typescript")
    (tsx-ts-mode :language-id "typescriptreact")
    (rust-mode :language-id "rust")
    (rust-ts-mode :language-id "rust")
    (go-mode :language-id "go")
    (go-ts-mode :language-id "go")
    (c-mode :language-id "c")
    (c-ts-mode :language-id "c")
    (c++-mode :language-id "cpp")
    (c++-ts-mode :language-id "cpp")
    (java-mode :language-id "java")
    (java-ts-mode :language-id "java")
    (sh-mode :language-id "shellscript")
    (bash-ts-mode :language-id "shellscript")
    (yaml-mode :language-id "yaml")
    (yaml-ts-mode :language-id "yaml")
    (conf-toml-mode :language-id "toml")
    (toml-ts-mode :language-id "toml")
    (mhtml-mode :language-id "html")
    (html-mode :language-id "html"))
  "Source modes calami can check (comments and docstrings).")

(defcustom calami-eglot-source-modes nil
  "Source modes for which Eglot should start calami instead of their usual server.
Each element is a mode symbol from `calami-eglot-all-source-modes', or t for
all of them.  Set it before loading this file, or call
`calami-eglot-register' again after changing it."
  :type '(choice (const :tag "All" t) (repeat symbol)))

(defun calami-eglot--contact (&optional _interactive)
  "Return the Eglot contact for calami, or explain why there is none."
  (let ((program (car calami-eglot-program)))
    (unless (or (file-name-absolute-p program) (executable-find program))
      (user-error
       (concat "calami: the server program `%s' was not found on PATH; install calami "
               "(for example `pipx install calami') or set `calami-eglot-program'")
       program))
    (unless (or (not (file-name-absolute-p program)) (file-executable-p program))
      (user-error "calami: `%s' is not an executable file; check `calami-eglot-program'"
                  program))
    (append calami-eglot-program
            (list :initializationOptions calami-eglot-settings))))

(defun calami-eglot--selected-source-modes ()
  "The entries of `calami-eglot-all-source-modes' chosen by the user."
  (if (eq calami-eglot-source-modes t)
      calami-eglot-all-source-modes
    (cl-remove-if-not (lambda (spec) (memq (car spec) calami-eglot-source-modes))
                      calami-eglot-all-source-modes)))

(defvar calami-eglot--other-workspace-configuration
  (default-value 'eglot-workspace-configuration)
  "The default `eglot-workspace-configuration' before this file replaced it.")

(defun calami-eglot--workspace-configuration (server)
  "Add the \"calami\" section to whatever configuration SERVER would get."
  (let* ((other calami-eglot--other-workspace-configuration)
         (base (if (functionp other) (funcall other server) other)))
    (if (and base (consp (car base)))     ; the older alist form
        (cons (cons :calami calami-eglot-settings)
              (assq-delete-all :calami (copy-sequence base)))
      (plist-put (copy-sequence base) :calami calami-eglot-settings))))

(defun calami-eglot-register ()
  "Put calami into `eglot-server-programs'.
Prose modes and the chosen source modes go first, so they win over other
servers for those modes.  `text-mode' goes last, so that plain text files
get calami while modes derived from it that have their own server (YAML,
for example) keep it."
  (interactive)
  (setq eglot-server-programs
        (cl-remove-if (lambda (entry) (eq (cdr entry) #'calami-eglot--contact))
                      eglot-server-programs))
  (push (cons (append (calami-eglot--selected-source-modes) calami-eglot-prose-modes)
              #'calami-eglot--contact)
        eglot-server-programs)
  (setq eglot-server-programs
        (append eglot-server-programs
                (list (cons '((text-mode :language-id "plaintext")) #'calami-eglot--contact)))))

(defun calami-eglot--served-mode-p (mode)
  "Non-nil when calami-eglot.el sends buffers of major MODE to calami."
  (or (eq mode 'text-mode)
      (assq mode calami-eglot-prose-modes)
      (assq mode (calami-eglot--selected-source-modes))))

(defun calami-eglot--maybe-ensure ()
  "Call `eglot-ensure' in file buffers whose major mode calami serves."
  (when (and buffer-file-name (calami-eglot--served-mode-p major-mode))
    (eglot-ensure)))

(defun calami-eglot-ensure ()
  "Start calami automatically in the modes it serves.
Hooks `text-mode-hook' and `prog-mode-hook', but starts Eglot only for
the modes listed above, not for every mode derived from them."
  (add-hook 'text-mode-hook #'calami-eglot--maybe-ensure)
  (add-hook 'prog-mode-hook #'calami-eglot--maybe-ensure))

(defun calami-eglot-last-error ()
  "The last \"calami: ...\" line a calami server wrote to stderr, or nil.
The server writes one such line, naming the fix, when it cannot start
\(for example when the model file is missing)."
  (let (found)
    (dolist (buffer (buffer-list))
      (when (string-match-p "EGLOT.*stderr" (buffer-name buffer))
        (with-current-buffer buffer
          (save-excursion
            (goto-char (point-max))
            (when (re-search-backward "^calami: .*$" nil t)
              (setq found (match-string 0)))))))
    found))

(defun calami-eglot--explain-failure (start &rest args)
  "Call START (the `eglot' command) with ARGS; on failure show calami's reason."
  (condition-case err
      (apply start args)
    (error
     (let ((reason (calami-eglot-last-error)))
       (if reason
           (user-error "%s" reason)
         (signal (car err) (cdr err)))))))

(advice-add 'eglot :around #'calami-eglot--explain-failure)

(defun calami-eglot--explain-exit (sentinel process event)
  "Run jsonrpc's SENTINEL for PROCESS and EVENT; name calami's reason on failure.
A server that dies before it answers `initialize' after the connection
went on in the background (as with `eglot-ensure') is reported from the
process sentinel as \"[eglot] -1: Server died\"; when that server was
calami and wrote its \"calami: ...\" line, that line is the error instead."
  (condition-case err
      (funcall sentinel process event)
    (error
     (let* ((stderr (process-get process 'jsonrpc-stderr))
            (reason (and (buffer-live-p stderr)
                         (with-current-buffer stderr
                           (save-excursion
                             (goto-char (point-max))
                             (and (re-search-backward "^calami: .*$" nil t)
                                  (match-string 0)))))))
       (if reason
           (error "%s" reason)
         (signal (car err) (cdr err)))))))

(advice-add 'jsonrpc--process-sentinel :around #'calami-eglot--explain-exit)
(calami-eglot-register)
;; Eglot reads `eglot-workspace-configuration' buffer-locally (directory
;; variables can override it); the default value gets the calami section.
(setq-default eglot-workspace-configuration #'calami-eglot--workspace-configuration)

(provide 'calami-eglot)
;;; calami-eglot.el ends here
