#!/usr/bin/env bash
# Runs the Dockerfile's steps as plain commands, so that it cannot rot where no container engine runs
# (CI here has the docker client but no engine). Each stage's file system is a folder under a temp dir:
#   named stages (FROM ... AS NAME, the build): ARG, WORKDIR, COPY and RUN are carried out (RUN with
#                bash, in the mapped WORKDIR);
#   the last, unnamed stage (the image that runs): COPY --from=NAME must find what that stage made, other COPY sources must exist in the
#                repository and not be left out by .dockerignore; RUN (users, ownership) is not carried
#                out, since it changes the machine; ENTRYPOINT + CMD are started with their absolute
#                paths mapped into the stage's folder, the HEALTHCHECK command must call it healthy,
#                and SIGTERM must stop it cleanly.
# The service is bound to 127.0.0.1 on a port of the system's choosing instead of the CMD's
# 0.0.0.0:8470: CI listens on loopback only, and the port may be taken. Then deploy/wayhold.service's ExecStart options are parsed
# by the built jar (with --help, so nothing starts).
set -euo pipefail
cd "$(dirname "$0")/.."
repo="$(pwd)"
dockerfile="${repo}/Dockerfile"
work="$(mktemp -d)"
server_pid=""
cleanup() {
    if [[ -n "${server_pid}" ]] && kill -0 "${server_pid}" 2>/dev/null; then
        kill "${server_pid}" 2>/dev/null || true
        wait "${server_pid}" 2>/dev/null || true
    fi
    rm -rf "${work}"
}
trap cleanup EXIT

fail() {
    echo "dockerfile-steps: $*" >&2
    exit 1
}

# One instruction per line: join continuations, drop comments and blank lines.
instructions() {
    sed -e 's/\r$//' "${dockerfile}" | awk '
        /^[[:space:]]*#/ && buf == "" { next }
        {
            line = $0
            if (sub(/\\[[:space:]]*$/, "", line)) { buf = buf line " "; next }
            buf = buf line
            if (buf ~ /[^[:space:]]/) print buf
            buf = ""
        }'
}

# The items of an exec-form array such as ["java", "-jar", "/opt/x.jar"] (no quotes or commas inside).
exec_items() {
    local array="$1"
    array="${array#*[}"
    array="${array%]*}"
    local IFS=','
    local item
    for item in ${array}; do
        item="${item#"${item%%[![:space:]]*}"}"
        item="${item%"${item##*[![:space:]]}"}"
        item="${item#\"}"
        item="${item%\"}"
        printf '%s\n' "${item}"
    done
}

# A path inside a stage: absolute paths under the stage's root, relative ones under its WORKDIR.
in_stage() {
    local root="$1" cwd="$2" path="$3"
    if [[ "${path}" == /* ]]; then
        printf '%s%s' "${root}" "${path}"
    else
        printf '%s/%s' "${cwd}" "${path}"
    fi
}

# Docker's COPY: a directory's contents go into DEST; a file goes into DEST/ when DEST ends in / or is a
# directory, else it becomes DEST.
copy_into() {
    local src="$1" dest="$2"
    if [[ -d "${src}" ]]; then
        mkdir -p "${dest}"
        cp -a "${src}/." "${dest}/"
    elif [[ "${dest}" == */ || -d "${dest}" ]]; then
        mkdir -p "${dest}"
        cp -a "${src}" "${dest}/"
    else
        mkdir -p "$(dirname "${dest}")"
        cp -a "${src}" "${dest}"
    fi
}

# True when .dockerignore leaves the top-level entry of PATH out of the build context.
ignored() {
    local top="${1%%/*}"
    [[ -f "${repo}/.dockerignore" ]] && grep -qxF "${top}" <(sed -e 's/\r$//' -e '/^#/d' -e 's#/$##' "${repo}/.dockerignore")
}

stage=""
named=""
stage_index=0
declare -A stage_root
cwd=""
entrypoint=""
cmd=""
healthcheck=""
while IFS= read -r line; do
    keyword="${line%%[[:space:]]*}"
    rest="${line#"${keyword}"}"
    rest="${rest#"${rest%%[![:space:]]*}"}"
    case "${keyword^^}" in
        FROM)
            stage_index=$((stage_index + 1))
            stage="stage${stage_index}"
            named=""
            if [[ "${rest}" =~ [[:space:]][Aa][Ss][[:space:]]+([A-Za-z0-9_.-]+)$ ]]; then
                stage="${BASH_REMATCH[1]}"
                named="yes"
            fi
            stage_root[${stage}]="${work}/${stage}"
            mkdir -p "${stage_root[${stage}]}"
            cwd="${stage_root[${stage}]}"
            echo "dockerfile-steps: FROM ${rest} (folder ${stage_root[${stage}]})"
            ;;
        ARG)
            name="${rest%%=*}"
            value=""
            [[ "${rest}" == *=* ]] && value="${rest#*=}"
            # A value given to this script's environment wins, as --build-arg does.
            export "${name}=${!name:-${value}}"
            ;;
        ENV)
            export "${rest%%=*}=${rest#*=}"
            ;;
        WORKDIR)
            cwd="$(in_stage "${stage_root[${stage}]}" "${cwd}" "${rest}")"
            mkdir -p "${cwd}"
            ;;
        COPY)
            from=""
            read -r -a words <<<"${rest}"
            args=()
            for w in "${words[@]}"; do
                case "${w}" in
                    --from=*) from="${w#--from=}" ;;
                    --*) ;;
                    *) args+=("${w}") ;;
                esac
            done
            (( ${#args[@]} >= 2 )) || fail "COPY needs a source and a destination: ${line}"
            dest="$(in_stage "${stage_root[${stage}]}" "${cwd}" "${args[-1]}")"
            [[ "${args[-1]}" == */ ]] && dest="${dest}/"
            for src in "${args[@]:0:${#args[@]}-1}"; do
                if [[ -n "${from}" ]]; then
                    [[ -n "${stage_root[${from}]:-}" ]] || fail "COPY --from=${from}: no such stage"
                    path="${stage_root[${from}]}${src}"
                    [[ -e "${path}" ]] || fail "COPY --from=${from} ${src}: the ${from} stage made no such file"
                else
                    path="${repo}/${src}"
                    [[ -e "${path}" ]] || fail "COPY ${src}: no such file in the repository"
                    ! ignored "${src}" || fail "COPY ${src}: .dockerignore leaves it out of the build context"
                fi
                copy_into "${path}" "${dest}"
                echo "dockerfile-steps: COPY ${from:+--from=${from} }${src} -> ${args[-1]}"
            done
            ;;
        RUN)
            # Build-time flags such as --mount=type=cache are for the engine; the command is what follows.
            command="${rest}"
            while [[ "${command}" == --* ]]; do
                command="${command#*[[:space:]]}"
                command="${command#"${command%%[![:space:]]*}"}"
            done
            if [[ -n "${named}" ]]; then
                echo "dockerfile-steps: RUN ${command}"
                (cd "${cwd}" && bash -euo pipefail -c "${command}") || fail "RUN failed: ${command}"
            else
                # The run stage's RUN sets up users and ownership in the image: its tools must exist there,
                # not here, so only its presence is noted.
                echo "dockerfile-steps: RUN (in the image only) ${command}"
            fi
            ;;
        VOLUME)
            while IFS= read -r v; do
                mkdir -p "${stage_root[${stage}]}${v}"
            done < <(exec_items "${rest}")
            ;;
        ENTRYPOINT) entrypoint="${rest}" ;;
        CMD) cmd="${rest}" ;;
        HEALTHCHECK) healthcheck="${rest#*CMD }" ;;
        USER | EXPOSE | LABEL) ;;
        *) fail "instruction ${keyword} is not handled by this script: ${line}" ;;
    esac
done < <(instructions)

[[ -z "${named}" ]] || fail "the last stage is the image that runs: give it no name"
[[ -n "${entrypoint}" && -n "${cmd}" ]] || fail "the last stage needs ENTRYPOINT and CMD"
[[ "${entrypoint}" == \[* && "${cmd}" == \[* ]] || fail "ENTRYPOINT and CMD must be exec-form arrays"
[[ -n "${healthcheck}" ]] || fail "the image needs a HEALTHCHECK"
root="${stage_root[${stage}]}"

# The command line, absolute paths mapped into the run stage's folder; loopback, any free port.
command_line=()
previous=""
while IFS= read -r item; do
    case "${previous}" in
        --bind) item="127.0.0.1" ;;
        --port) item="0" ;;
        *) [[ "${item}" == /* ]] && item="${root}${item}" ;;
    esac
    command_line+=("${item}")
    previous="${item}"
done < <(exec_items "${entrypoint}"; exec_items "${cmd}")
[[ -x "$(command -v "${command_line[0]}")" ]] || fail "${command_line[0]}: not on the PATH"
for item in "${command_line[@]}"; do
    if [[ "${item}" == "${root}"/* && "${item}" != "${root}/var/lib/wayhold" ]]; then
        [[ -e "${item}" ]] || fail "the command names ${item#"${root}"}, which the image does not hold"
    fi
done

echo "dockerfile-steps: starting ${command_line[*]}"
log="${work}/serve.log"
"${command_line[@]}" >"${log}" 2>&1 &
server_pid=$!

health=()
while IFS= read -r item; do
    [[ "${item}" == /* ]] && item="${root}${item}"
    health+=("${item}")
done < <(exec_items "${healthcheck}")
healthy=""
port=""
for _ in $(seq 1 120); do
    if ! kill -0 "${server_pid}" 2>/dev/null; then
        cat "${log}" >&2
        fail "the service stopped before it became healthy"
    fi
    port="$(sed -n 's#^wayhold serving on http://127\.0\.0\.1:\([0-9]*\).*#\1#p' "${log}")"
    if [[ -n "${port}" ]] && WAYHOLD_PORT="${port}" "${health[@]}"; then
        healthy="yes"
        break
    fi
    sleep 0.5
done
[[ -n "${healthy}" ]] || { cat "${log}" >&2; fail "HEALTHCHECK never passed within 60 s"; }
echo "dockerfile-steps: HEALTHCHECK passed on 127.0.0.1:${port}"
"${command_line[0]}" "${command_line[1]}" "${command_line[2]}" --version

kill -TERM "${server_pid}"
status=0
wait "${server_pid}" || status=$?
server_pid=""
grep -q "wayhold stopped" "${log}" || { cat "${log}" >&2; fail "SIGTERM did not stop the service cleanly"; }
ls "${root}/var/lib/wayhold" | grep -q '^snapshot-' || fail "no snapshot in the data volume after SIGTERM"
echo "dockerfile-steps: SIGTERM stopped it cleanly (exit ${status}) with a snapshot in the volume"

# The systemd example: its ExecStart options must be ones the built jar takes.
unit="${repo}/deploy/wayhold.service"
exec_start="$(sed -n 's/^ExecStart=//p' "${unit}")"
[[ -n "${exec_start}" ]] || fail "deploy/wayhold.service has no ExecStart"
read -r -a unit_words <<<"${exec_start}"
unit_args=()
after_jar=""
for w in "${unit_words[@]}"; do
    if [[ -n "${after_jar}" ]]; then
        unit_args+=("${w}")
    elif [[ "${w}" == *.jar ]]; then
        after_jar="yes"
    fi
done
[[ -n "${after_jar}" ]] || fail "deploy/wayhold.service: ExecStart runs no jar"
java -jar "${root}/opt/wayhold/wayhold.jar" "${unit_args[@]}" --help >/dev/null \
    || fail "deploy/wayhold.service: ExecStart's options are refused: ${unit_args[*]}"
echo "dockerfile-steps: deploy/wayhold.service's ExecStart options parse"
echo "dockerfile-steps: ok"
