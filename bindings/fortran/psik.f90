!> @file psik.f90
!> Fortran binding of psik (ISO_C_BINDING): module `psik`.
!>
!> The derived types psik_model and psik_state are bind(c) mirrors of the C
!> structs (ABI version 1: 304 and 48 bytes); the status and kind constants
!> carry their C names; the procedures have the C names and semantics:
!> heads and water contents are passed by value, parameter vectors as
!> arrays in kind order, indices are 0-based as in C.
!>
!> Differences forced by Fortran:
!> - Fortran names are case-insensitive, so the C function psik_vgm (which
!>   would clash with the kind constant PSIK_VGM) is psik_init_vgm here.
!> - psik_init is a module function that calls psik_init_abi with this
!>   module's PSIK_ABI_VERSION and c_sizeof(m): a module built against
!>   another layout gets PSIK_EABI instead of a corrupted model.
!> - Functions returning C strings return character(len=:), allocatable
!>   ("" for NULL); psik_check writes its message into a character variable.
!> - psik_eval_batch and psik_table_eval_batch take optional output arrays
!>   (absent = NULL in C). A table lives in caller memory: allocate an
!>   integer(c_int8_t) target array of psik_table_bytes(knots) bytes, pass
!>   c_loc of it to psik_table_build and keep it while the table is used.
module psik
  use, intrinsic :: iso_c_binding
  implicit none
  private :: c_to_f, f_to_c

  integer(c_int), parameter :: PSIK_ABI_VERSION = 1
  integer(c_int), parameter :: PSIK_MAX_PARAMS = 16

  ! psik_status
  integer(c_int), parameter :: PSIK_OK = 0, PSIK_EINVAL = 1, PSIK_EDOMAIN = 2, &
       PSIK_ENOCONV = 3, PSIK_EDATA = 4, PSIK_ENOMEM = 5, PSIK_EABI = 6

  ! psik_kind
  integer(c_int), parameter :: PSIK_VGM = 1, PSIK_VGM_AE = 2, PSIK_VG_FREE_M = 3, &
       PSIK_VGB = 4, PSIK_BCM = 5, PSIK_BCB = 6, PSIK_KOSUGI = 7, PSIK_DURNER2 = 8, &
       PSIK_DURNER3 = 9, PSIK_GARDNER = 10

  !> struct psik_model: fill it only with psik_init or psik_init_vgm.
  type, bind(c) :: psik_model
     integer(c_int) :: kind = 0          ! psik_kind; 0 when not initialised
     integer(c_int) :: npar = 0
     integer(c_int) :: abi_size = 0      ! unsigned int in C
     integer(c_int) :: abi_version = 0   ! unsigned int in C
     real(c_double) :: par(PSIK_MAX_PARAMS) = 0
     real(c_double) :: theta_r = 0, theta_s = 0, ks = 0, h_sat = 0
     real(c_double) :: aux(PSIK_MAX_PARAMS) = 0
  end type psik_model

  !> struct psik_state: all properties at one head (psik_eval).
  type, bind(c) :: psik_state
     real(c_double) :: se, theta, kr, k, capacity, dk_dh
  end type psik_state

  !> struct psik_table_error: bounds reported by psik_table_build.
  type, bind(c) :: psik_table_error
     real(c_double) :: theta_rel, k_rel
  end type psik_table_error

  ! psik_fit_result flag bits and psik_fit_stop values
  integer(c_int), parameter :: PSIK_FIT_FREE = 0, PSIK_FIT_FIXED = 1, PSIK_FIT_AUTOFIXED = 2, &
       PSIK_FIT_AT_LOWER = 4, PSIK_FIT_AT_UPPER = 8, PSIK_FIT_UNDEFINED = 16
  integer(c_int), parameter :: PSIK_FIT_STOP_STEP = 1, PSIK_FIT_STOP_REDUCTION = 2, &
       PSIK_FIT_STOP_GRADIENT = 3, PSIK_FIT_STOP_EXACT = 4, PSIK_FIT_STOP_MAXITER = 5, &
       PSIK_FIT_STOP_STALLED = 6

  !> struct psik_fit_data (pointers as c_ptr: use psik_fit_simple, or c_loc
  !> of target arrays; c_null_ptr for absent weights).
  type, bind(c) :: psik_fit_data
     integer(c_size_t) :: n_theta = 0
     type(c_ptr) :: h_theta = c_null_ptr, theta = c_null_ptr, w_theta = c_null_ptr
     integer(c_size_t) :: n_k = 0
     type(c_ptr) :: h_k = c_null_ptr, k = c_null_ptr, w_k = c_null_ptr
     real(c_double) :: k_weight = 0
  end type psik_fit_data

  !> struct psik_fit_options: fill with psik_fit_defaults first.
  type, bind(c) :: psik_fit_options
     integer(c_int) :: fixed(PSIK_MAX_PARAMS)
     real(c_double) :: value(PSIK_MAX_PARAMS), lo(PSIK_MAX_PARAMS), hi(PSIK_MAX_PARAMS)
     integer(c_int) :: starts, samples, max_iter
     real(c_double) :: tol, confidence
  end type psik_fit_options

  !> struct psik_fit_result. corr is C's corr[i][j] at corr(j+1, i+1).
  type, bind(c) :: psik_fit_result
     integer(c_int) :: kind, npar
     real(c_double) :: par(PSIK_MAX_PARAMS), std_err(PSIK_MAX_PARAMS)
     real(c_double) :: ci_lo(PSIK_MAX_PARAMS), ci_hi(PSIK_MAX_PARAMS)
     integer(c_int) :: flag(PSIK_MAX_PARAMS)
     real(c_double) :: corr(PSIK_MAX_PARAMS, PSIK_MAX_PARAMS)
     real(c_double) :: sse, sse_theta, sse_logk, rmse, r2, r2_logk, aic, aicc, bic
     real(c_double) :: t_value, confidence
     integer(c_int) :: n_obs, n_theta, n_k, n_free, dof, iterations, starts, evaluations, stop
     character(kind=c_char) :: note(512)
  end type psik_fit_result

  !> Default knot density of a table (knots per decade of suction).
  real(c_double), parameter :: PSIK_TABLE_DENSITY = 200d0

  interface
     function psik_strerror_c(s) bind(c, name="psik_strerror") result(p)
       import :: c_int, c_ptr
       integer(c_int), value :: s
       type(c_ptr) :: p
     end function
     function psik_version_c() bind(c, name="psik_version") result(p)
       import :: c_ptr
       type(c_ptr) :: p
     end function
     function psik_kind_name_c(kind) bind(c, name="psik_kind_name") result(p)
       import :: c_int, c_ptr
       integer(c_int), value :: kind
       type(c_ptr) :: p
     end function
     function psik_kind_title_c(kind) bind(c, name="psik_kind_title") result(p)
       import :: c_int, c_ptr
       integer(c_int), value :: kind
       type(c_ptr) :: p
     end function
     function psik_kind_from_name_c(name) bind(c, name="psik_kind_from_name") result(k)
       import :: c_int, c_char
       character(kind=c_char), intent(in) :: name(*)
       integer(c_int) :: k
     end function
     function psik_param_name_c(kind, i) bind(c, name="psik_param_name") result(p)
       import :: c_int, c_ptr
       integer(c_int), value :: kind, i
       type(c_ptr) :: p
     end function
     function psik_param_index_c(kind, name) bind(c, name="psik_param_index") result(i)
       import :: c_int, c_char
       integer(c_int), value :: kind
       character(kind=c_char), intent(in) :: name(*)
       integer(c_int) :: i
     end function
     function psik_check_c(kind, par, msg, cap) bind(c, name="psik_check") result(st)
       import :: c_int, c_double, c_char, c_size_t
       integer(c_int), value :: kind
       real(c_double), intent(in) :: par(*)
       character(kind=c_char), intent(out) :: msg(*)
       integer(c_size_t), value :: cap
       integer(c_int) :: st
     end function

     !> Number of parameters of kind; -1 when unknown.
     function psik_param_count(kind) bind(c, name="psik_param_count") result(n)
       import :: c_int
       integer(c_int), value :: kind
       integer(c_int) :: n
     end function
     !> Plausible range of parameter i (0-based) of kind.
     function psik_param_range(kind, i, lo, hi) bind(c, name="psik_param_range") result(st)
       import :: c_int, c_double
       integer(c_int), value :: kind, i
       real(c_double), intent(out) :: lo, hi
       integer(c_int) :: st
     end function
     !> psik_init with the caller's layout (version, size).
     function psik_init_abi(m, kind, par, abi_version, size) &
          bind(c, name="psik_init_abi") result(st)
       import :: psik_model, c_int, c_double, c_size_t
       type(psik_model), intent(inout) :: m
       integer(c_int), value :: kind
       real(c_double), intent(in) :: par(*)
       integer(c_int), value :: abi_version
       integer(c_size_t), value :: size
       integer(c_int) :: st
     end function
     !> van Genuchten-Mualem with l = 0.5 (C psik_vgm).
     function psik_init_vgm(m, theta_r, theta_s, alpha, n, ks) &
          bind(c, name="psik_vgm") result(st)
       import :: psik_model, c_int, c_double
       type(psik_model), intent(inout) :: m
       real(c_double), value :: theta_r, theta_s, alpha, n, ks
       integer(c_int) :: st
     end function
     !> Number of parameters of an initialised model, copied into par.
     function psik_model_params(m, par) bind(c, name="psik_model_params") result(n)
       import :: psik_model, c_int, c_double
       type(psik_model), intent(in) :: m
       real(c_double), intent(out) :: par(*)
       integer(c_int) :: n
     end function

     function psik_se(m, h) bind(c, name="psik_se") result(v)
       import :: psik_model, c_double
       type(psik_model), intent(in) :: m
       real(c_double), value :: h
       real(c_double) :: v
     end function
     function psik_theta(m, h) bind(c, name="psik_theta") result(v)
       import :: psik_model, c_double
       type(psik_model), intent(in) :: m
       real(c_double), value :: h
       real(c_double) :: v
     end function
     function psik_head(m, theta) bind(c, name="psik_head") result(v)
       import :: psik_model, c_double
       type(psik_model), intent(in) :: m
       real(c_double), value :: theta
       real(c_double) :: v
     end function
     function psik_head_se(m, se) bind(c, name="psik_head_se") result(v)
       import :: psik_model, c_double
       type(psik_model), intent(in) :: m
       real(c_double), value :: se
       real(c_double) :: v
     end function
     function psik_kr(m, h) bind(c, name="psik_kr") result(v)
       import :: psik_model, c_double
       type(psik_model), intent(in) :: m
       real(c_double), value :: h
       real(c_double) :: v
     end function
     function psik_k(m, h) bind(c, name="psik_k") result(v)
       import :: psik_model, c_double
       type(psik_model), intent(in) :: m
       real(c_double), value :: h
       real(c_double) :: v
     end function
     function psik_k_theta(m, theta) bind(c, name="psik_k_theta") result(v)
       import :: psik_model, c_double
       type(psik_model), intent(in) :: m
       real(c_double), value :: theta
       real(c_double) :: v
     end function
     function psik_capacity(m, h) bind(c, name="psik_capacity") result(v)
       import :: psik_model, c_double
       type(psik_model), intent(in) :: m
       real(c_double), value :: h
       real(c_double) :: v
     end function
     function psik_dk_dh(m, h) bind(c, name="psik_dk_dh") result(v)
       import :: psik_model, c_double
       type(psik_model), intent(in) :: m
       real(c_double), value :: h
       real(c_double) :: v
     end function
     function psik_diffusivity(m, theta) bind(c, name="psik_diffusivity") result(v)
       import :: psik_model, c_double
       type(psik_model), intent(in) :: m
       real(c_double), value :: theta
       real(c_double) :: v
     end function
     !> All properties at one head.
     subroutine psik_eval(m, h, out) bind(c, name="psik_eval")
       import :: psik_model, psik_state, c_double
       type(psik_model), intent(in) :: m
       real(c_double), value :: h
       type(psik_state), intent(out) :: out
     end subroutine
     !> psik_eval over count heads; absent outputs are skipped.
     subroutine psik_eval_batch(m, count, h, theta, k, capacity, dk_dh) &
          bind(c, name="psik_eval_batch")
       import :: psik_model, c_double, c_size_t
       type(psik_model), intent(in) :: m
       integer(c_size_t), value :: count
       real(c_double), intent(in) :: h(*)
       real(c_double), intent(out), optional :: theta(*), k(*), capacity(*), dk_dh(*)
     end subroutine

     function psik_preset_c(m, texture) bind(c, name="psik_preset") result(st)
       import :: psik_model, c_int, c_char
       type(psik_model), intent(inout) :: m
       character(kind=c_char), intent(in) :: texture(*)
       integer(c_int) :: st
     end function
     function psik_preset_name_c(i) bind(c, name="psik_preset_name") result(p)
       import :: c_int, c_ptr
       integer(c_int), value :: i
       type(c_ptr) :: p
     end function

     !> Number of knots for a table over [h_dry, h_wet] at `density` knots
     !> per decade (0: PSIK_TABLE_DENSITY); 0 for an invalid range.
     function psik_table_knots(h_dry, h_wet, density) bind(c, name="psik_table_knots") result(n)
       import :: c_double, c_size_t
       real(c_double), value :: h_dry, h_wet, density
       integer(c_size_t) :: n
     end function
     !> Bytes of memory a table of `knots` knots needs.
     function psik_table_bytes(knots) bind(c, name="psik_table_bytes") result(n)
       import :: c_size_t
       integer(c_size_t), value :: knots
       integer(c_size_t) :: n
     end function
     !> Build a table of m in caller memory `mem` (c_loc of a byte array of
     !> at least psik_table_bytes(knots) bytes); `table` receives its handle.
     function psik_table_build(m, h_dry, h_wet, knots, mem, bytes, table, err) &
          bind(c, name="psik_table_build") result(st)
       import :: psik_model, psik_table_error, c_double, c_size_t, c_ptr, c_int
       type(psik_model), intent(in) :: m
       real(c_double), value :: h_dry, h_wet
       integer(c_size_t), value :: knots
       type(c_ptr), value :: mem
       integer(c_size_t), value :: bytes
       type(c_ptr), intent(out) :: table
       type(psik_table_error), intent(out), optional :: err
       integer(c_int) :: st
     end function
     !> All values at head h from a table.
     subroutine psik_table_eval(table, h, out) bind(c, name="psik_table_eval")
       import :: psik_state, c_double, c_ptr
       type(c_ptr), value :: table
       real(c_double), value :: h
       type(psik_state), intent(out) :: out
     end subroutine
     !> psik_table_eval over count heads; absent outputs are skipped.
     subroutine psik_table_eval_batch(table, count, h, theta, k, capacity, dk_dh) &
          bind(c, name="psik_table_eval_batch")
       import :: c_double, c_size_t, c_ptr
       type(c_ptr), value :: table
       integer(c_size_t), value :: count
       real(c_double), intent(in) :: h(*)
       real(c_double), intent(out), optional :: theta(*), k(*), capacity(*), dk_dh(*)
     end subroutine

     !> Fill o with the fitting defaults (C psik_fit_defaults).
     subroutine psik_fit_defaults(o) bind(c, name="psik_fit_defaults")
       import :: psik_fit_options
       type(psik_fit_options), intent(out) :: o
     end subroutine
     function psik_fit_c(kind, data, opt, res, msg, cap) bind(c, name="psik_fit") result(st)
       import :: psik_fit_data, psik_fit_options, psik_fit_result, c_int, c_char, c_size_t
       integer(c_int), value :: kind
       type(psik_fit_data), intent(in) :: data
       type(psik_fit_options), intent(in), optional :: opt
       type(psik_fit_result), intent(out) :: res
       character(kind=c_char), intent(out) :: msg(*)
       integer(c_size_t), value :: cap
       integer(c_int) :: st
     end function
     !> Jacobian of the weighted residuals at par (C psik_fit_jacobian; jac
     !> holds C's row-major (n_theta + n_k) x npar matrix).
     function psik_fit_jacobian(kind, data, par, numeric, jac) &
          bind(c, name="psik_fit_jacobian") result(st)
       import :: psik_fit_data, c_int, c_double
       integer(c_int), value :: kind
       type(psik_fit_data), intent(in) :: data
       real(c_double), intent(in) :: par(*)
       integer(c_int), value :: numeric
       real(c_double), intent(out) :: jac(*)
       integer(c_int) :: st
     end function
     function psik_fit_stop_name_c(stop) bind(c, name="psik_fit_stop_name") result(p)
       import :: c_int, c_ptr
       integer(c_int), value :: stop
       type(c_ptr) :: p
     end function
     !> Quantile of Student's t distribution (C psik_t_quantile).
     function psik_t_quantile(p, dof) bind(c, name="psik_t_quantile") result(t)
       import :: c_double
       real(c_double), value :: p, dof
       real(c_double) :: t
     end function
     !> Rank fits by AICc (C psik_fit_rank); order receives 0-based indices.
     function psik_fit_rank(fits, count, order, weight) bind(c, name="psik_fit_rank") result(st)
       import :: psik_fit_result, c_size_t, c_double, c_int
       type(psik_fit_result), intent(in) :: fits(*)
       integer(c_size_t), value :: count
       integer(c_size_t), intent(out) :: order(*)
       real(c_double), intent(out), optional :: weight(*)
       integer(c_int) :: st
     end function
  end interface

contains

  !> Fit kind to data (C psik_fit); msg (optional) receives the library's
  !> sentence on failure.
  function psik_fit(kind, data, opt, res, msg) result(st)
    integer(c_int), intent(in) :: kind
    type(psik_fit_data), intent(in) :: data
    type(psik_fit_options), intent(in), optional :: opt
    type(psik_fit_result), intent(out) :: res
    character(len=*), intent(out), optional :: msg
    integer(c_int) :: st
    character(kind=c_char) :: buf(512)
    integer :: i
    buf = c_null_char
    st = psik_fit_c(kind, data, opt, res, buf, int(size(buf), c_size_t))
    if (present(msg)) then
       msg = ""
       do i = 1, min(len(msg), size(buf))
          if (buf(i) == c_null_char) exit
          msg(i:i) = buf(i)
       end do
    end if
  end function

  !> Retention-only fit from Fortran arrays (they must be TARGETs or
  !> otherwise contiguous; w optional): builds the psik_fit_data itself.
  function psik_fit_simple(kind, h, theta, res, msg, w, opt) result(st)
    integer(c_int), intent(in) :: kind
    real(c_double), intent(in), target, contiguous :: h(:), theta(:)
    type(psik_fit_result), intent(out) :: res
    character(len=*), intent(out), optional :: msg
    real(c_double), intent(in), target, contiguous, optional :: w(:)
    type(psik_fit_options), intent(in), optional :: opt
    integer(c_int) :: st
    type(psik_fit_data) :: d
    if (size(h) /= size(theta)) then
       st = PSIK_EINVAL
       if (present(msg)) msg = "h and theta differ in length"
       return
    end if
    d%n_theta = size(h, kind=c_size_t)
    d%h_theta = c_loc(h)
    d%theta = c_loc(theta)
    if (present(w)) d%w_theta = c_loc(w)
    st = psik_fit(kind, d, opt, res, msg)
  end function

  !> Why a fit stopped, as text.
  function psik_fit_stop_name(stop) result(text)
    integer(c_int), intent(in) :: stop
    character(len=:), allocatable :: text
    text = c_to_f(psik_fit_stop_name_c(stop))
  end function

  !> The note of a fit result as a Fortran string.
  function psik_fit_note(res) result(text)
    type(psik_fit_result), intent(in), target :: res
    character(len=:), allocatable :: text
    text = c_to_f(c_loc(res%note))
  end function

  !> The van Genuchten-Mualem model of a USDA texture class (C psik_preset).
  function psik_preset(m, texture) result(st)
    type(psik_model), intent(inout) :: m
    character(len=*), intent(in) :: texture
    integer(c_int) :: st
    character(kind=c_char, len=len_trim(texture) + 1), target :: c
    c = f_to_c(texture)
    st = psik_preset_c(m, c)
  end function

  !> Name of preset i (0-based); "" when out of range.
  function psik_preset_name(i) result(text)
    integer(c_int), intent(in) :: i
    character(len=:), allocatable :: text
    text = c_to_f(psik_preset_name_c(i))
  end function

  !> Copy a NUL-terminated C string into a Fortran string ("" for NULL).
  function c_to_f(p) result(s)
    type(c_ptr), intent(in) :: p
    character(len=:), allocatable :: s
    character(kind=c_char), pointer :: a(:)
    integer :: n
    interface
       function strlen(q) bind(c, name="strlen") result(len)
         import :: c_ptr, c_size_t
         type(c_ptr), value :: q
         integer(c_size_t) :: len
       end function
    end interface
    if (.not. c_associated(p)) then
       s = ""
       return
    end if
    n = int(strlen(p))
    call c_f_pointer(p, a, [n])
    allocate(character(len=n) :: s)
    s = transfer(a(1:n), s)
  end function c_to_f

  !> A trimmed Fortran string as a NUL-terminated C string.
  pure function f_to_c(s) result(c)
    character(len=*), intent(in) :: s
    character(kind=c_char, len=len_trim(s) + 1) :: c
    c = trim(s) // c_null_char
  end function f_to_c

  !> A sentence describing status s.
  function psik_strerror(s) result(text)
    integer(c_int), intent(in) :: s
    character(len=:), allocatable :: text
    text = c_to_f(psik_strerror_c(s))
  end function

  !> The library's version string.
  function psik_version() result(text)
    character(len=:), allocatable :: text
    text = c_to_f(psik_version_c())
  end function

  !> Short name of a kind ("vgm", ...); "" when unknown.
  function psik_kind_name(kind) result(text)
    integer(c_int), intent(in) :: kind
    character(len=:), allocatable :: text
    text = c_to_f(psik_kind_name_c(kind))
  end function

  !> One line describing a kind with its reference; "" when unknown.
  function psik_kind_title(kind) result(text)
    integer(c_int), intent(in) :: kind
    character(len=:), allocatable :: text
    text = c_to_f(psik_kind_title_c(kind))
  end function

  !> The kind with short name `name` (trailing blanks ignored); 0 when unknown.
  function psik_kind_from_name(name) result(kind)
    character(len=*), intent(in) :: name
    integer(c_int) :: kind
    character(kind=c_char, len=len_trim(name) + 1), target :: c
    c = f_to_c(name)
    kind = psik_kind_from_name_c(c)
  end function

  !> Name of parameter i (0-based) of kind; "" when out of range.
  function psik_param_name(kind, i) result(text)
    integer(c_int), intent(in) :: kind, i
    character(len=:), allocatable :: text
    text = c_to_f(psik_param_name_c(kind, i))
  end function

  !> 0-based index of the parameter named `name` in kind; -1 when none.
  function psik_param_index(kind, name) result(i)
    integer(c_int), intent(in) :: kind
    character(len=*), intent(in) :: name
    integer(c_int) :: i
    character(kind=c_char, len=len_trim(name) + 1), target :: c
    c = f_to_c(name)
    i = psik_param_index_c(kind, c)
  end function

  !> Validate a parameter vector; msg (optional) receives the sentence that
  !> names the offending parameter, blank-padded (or blank when valid).
  function psik_check(kind, par, msg) result(st)
    integer(c_int), intent(in) :: kind
    real(c_double), intent(in) :: par(*)
    character(len=*), intent(out), optional :: msg
    integer(c_int) :: st
    character(kind=c_char) :: buf(512)
    integer :: i
    buf = c_null_char
    st = psik_check_c(kind, par, buf, int(size(buf), c_size_t))
    if (present(msg)) then
       msg = ""
       do i = 1, min(len(msg), size(buf))
          if (buf(i) == c_null_char) exit
          msg(i:i) = buf(i)
       end do
    end if
  end function

  !> Build a model (C psik_init through the layout check: returns
  !> PSIK_EABI when this module and the library disagree on the layout).
  function psik_init(m, kind, par) result(st)
    type(psik_model), intent(inout) :: m
    integer(c_int), intent(in) :: kind
    real(c_double), intent(in) :: par(*)
    integer(c_int) :: st
    st = psik_init_abi(m, kind, par, PSIK_ABI_VERSION, c_sizeof(m))
  end function

end module psik
