#!/usr/bin/env bash
# .ci/openssh.sh: ssh-keygen, the reference verifier of OpenSSH signatures,
# for the interoperability test of inflatrace's release signatures
# (cmd/inflatrace/internal/sshsig, INFLATRACE_SSH_E2E=1). Debian 12, root;
# installs nothing when ssh-keygen is there.
set -euo pipefail
if ! command -v ssh-keygen >/dev/null; then
  export DEBIAN_FRONTEND=noninteractive
  apt-get update -qq
  apt-get install -y -qq --no-install-recommends openssh-client >/dev/null
fi
ssh-keygen -V 2>&1 | head -1 || true
