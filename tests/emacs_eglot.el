;;; emacs_eglot.el --- headless Emacs driver for tests/test_emacs.py  -*- lexical-binding: t; -*-
;; Loads editors/emacs/deckward.el (DECKWARD_EL_DIR) and eglot (built in on
;; Emacs 29, Debian's elpa-eglot on 28), opens the deck named on the command
;; line, waits for the server's diagnostics to settle, and prints one JSON
;; line: the mode, the project root, the diagnostics and some faces.
(require 'package)
(package-initialize)
(require 'json)
(add-to-list 'load-path (getenv "DECKWARD_EL_DIR"))
(require 'deckward)
(require 'eglot)
(require 'flymake)
(setq deckward-server-command (append (json-parse-string (getenv "DECKWARD_LSP_CMD") :array-type 'list) nil))
(add-hook 'deck-mode-hook #'eglot-ensure)

(defun deck-test--diagnostics ()
  (vconcat
   (mapcar (lambda (d)
            (let ((beg (flymake-diagnostic-beg d)) (end (flymake-diagnostic-end d)))
              (list :line (line-number-at-pos beg)
                    :col (save-excursion (goto-char beg) (current-column))
                    :end_col (save-excursion (goto-char end) (current-column))
                    :type (symbol-name (flymake-diagnostic-type d))
                    :text (flymake-diagnostic-text d))))
          (sort (flymake-diagnostics) (lambda (a b) (< (flymake-diagnostic-beg a) (flymake-diagnostic-beg b)))))))

(defun deck-test--face-at (text)
  (save-excursion
    (goto-char (point-min))
    (if (search-forward text nil t)
        (let ((face (get-text-property (match-beginning 0) 'face)))
          (format "%s" face))
      "absent")))

(defun deck-test-run (file)
  (let ((timeout (string-to-number (or (getenv "DECKWARD_LSP_TIMEOUT_S") "30")))
        (start (float-time)) (last-change (float-time)) (seen nil) server)
    (find-file file)
    (run-hooks 'post-command-hook)      ; eglot-ensure connects from there
    (while (and (< (- (float-time) start) timeout)
                (not (and (> (length seen) 0) (> (- (float-time) last-change) 0.5))))
      (accept-process-output nil 0.1)
      (let ((now (deck-test--diagnostics)))
        (unless (equal now seen) (setq seen now last-change (float-time)))))
    (setq server (eglot-current-server))
    (font-lock-ensure)
    (let ((diagnostics (deck-test--diagnostics))
          (faces (list :keyword (deck-test--face-at "state")
                       :comment (deck-test--face-at "# The")
                       :key (deck-test--face-at "charge")
                       :basis (deck-test--face-at "aug-cc-pvdz")
                       :number (deck-test--face-at "1.1718")))
          (second-server nil))
      (when (getenv "DECKWARD_SECOND_DECK")  ; another deck of the same workspace
        (find-file (getenv "DECKWARD_SECOND_DECK"))
        (run-hooks 'post-command-hook)
        (setq start (float-time))
        (while (and (< (- (float-time) start) timeout) (not (eglot-current-server)))
          (accept-process-output nil 0.1))
        (setq second-server (eglot-current-server)))
      (deck-test--print server diagnostics faces second-server))))

(defun deck-test--print (server diagnostics faces second-server)
  (let ((servers 0))
    (maphash (lambda (_project list) (setq servers (+ servers (length list)))) eglot--servers-by-project)
    (princ (concat (json-encode
                    (list :mode (symbol-name major-mode)
                          :managed (if (bound-and-true-p eglot--managed-mode) t :json-false)
                          :root (and server (project-root (eglot--project server)))
                          :servers servers
                          :same_server (if (and second-server (eq server second-server)) t :json-false)
                          :diagnostics diagnostics
                          :faces faces))
                   "\n"))
    (when server (eglot-shutdown server))
    (kill-emacs 0)))

