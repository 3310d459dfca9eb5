! test_binding.f90 - the Fortran module psik against the C library.
! Sources: layout numbers from include/psik.h ABI 1 (as tests/unit/test_abi.c);
! values and messages from the C library itself, written by ref_values.c
! (read from the file named on the command line; exact comparisons are
! intended: built with -Wno-compare-reals); kind names from the
! DESIGN.md API contract. Prints "ok"/"FAIL" lines and a closing count.
program test_binding
  use, intrinsic :: iso_c_binding
  use psik
  implicit none
  type(psik_model), target :: m, m2
  type(psik_state) :: st
  integer :: npass = 0, nfail = 0, u, ios, kind, np, nh, i, ncmp, ndiff
  integer(c_intptr_t) :: base
  real(c_double) :: par(PSIK_MAX_PARAMS), row(20), got(10), bref(64, 4)
  real(c_double), allocatable :: hs(:), th(:), dk(:), kk(:)
  character(len=512) :: cmsg, fmsg, path
  character(len=10), parameter :: names(10) = [character(len=10) :: "vgm", "vgm_ae", &
       "vg_free_m", "vgb", "bcm", "bcb", "kosugi", "durner2", "durner3", "gardner"]
  integer(c_int), parameter :: consts(10) = [PSIK_VGM, PSIK_VGM_AE, PSIK_VG_FREE_M, &
       PSIK_VGB, PSIK_BCM, PSIK_BCB, PSIK_KOSUGI, PSIK_DURNER2, PSIK_DURNER3, PSIK_GARDNER]
  integer :: nknown
  integer(c_size_t) :: knots
  integer(c_int8_t), allocatable, target :: mem(:)
  type(c_ptr) :: tab
  type(psik_table_error) :: terr, terr_c
  real(c_double) :: trow(5), tb(5), tcap(5), tref(5, 4)
  type(psik_fit_data) :: fdata
  type(psik_fit_options) :: fopt
  type(psik_fit_result) :: fres
  integer(c_size_t) :: sz_c(4)
  real(c_double) :: fsse, fpar(6), ferr(6), ft(12)
  real(c_double), target :: fh(12) = [-1d0, -3d0, -10d0, -20d0, -33d0, -60d0, -100d0, -200d0, &
       -330d0, -1000d0, -3000d0, -15000d0]
  integer :: fnfree, fflag

  ! --- layout (ABI 1)
  base = transfer(c_loc(m), base)
  call check(c_sizeof(m) == 304_c_size_t, "c_sizeof(psik_model) = 304")
  call check(c_sizeof(st) == 48_c_size_t, "c_sizeof(psik_state) = 48")
  call check(off(c_loc(m%npar)) == 4 .and. off(c_loc(m%abi_size)) == 8 .and. &
       off(c_loc(m%abi_version)) == 12 .and. off(c_loc(m%par)) == 16 .and. &
       off(c_loc(m%theta_r)) == 144 .and. off(c_loc(m%theta_s)) == 152 .and. &
       off(c_loc(m%ks)) == 160 .and. off(c_loc(m%h_sat)) == 168 .and. &
       off(c_loc(m%aux)) == 176, "offsets of psik_model fields = C offsetof")

  ! --- constants against the library's table
  nknown = 0
  do i = 1, 10
     if (psik_kind_name(consts(i)) /= "") then
        nknown = nknown + 1
        call check(psik_kind_name(consts(i)) == trim(names(i)) .and. &
             psik_kind_from_name(trim(names(i))) == consts(i), "kind constant " // trim(names(i)))
     end if
  end do
  print '(a,i0,a)', "# ", nknown, " of the 10 kind constants are in the library's table"
  call check(psik_kind_name(0_c_int) == "" .and. psik_kind_from_name("nonsense") == 0, &
       "unknown kinds give empty name and 0")
  call check(psik_strerror(PSIK_EABI) == "the header used by the caller does not match the library", &
       "psik_strerror(PSIK_EABI) text")

  ! --- building
  par = 0
  par(1:6) = [0.078d0, 0.43d0, 0.036d0, 1.56d0, 24.96d0, 0.5d0]
  ios = psik_init(m, PSIK_VGM, par)
  call check(ios == PSIK_OK, "psik_init(vgm loam)")
  call check(m%abi_size == 304 .and. m%abi_version == PSIK_ABI_VERSION .and. m%npar == 6, &
       "library records the layout in the model")
  ! (each call that writes a model is its own statement: Fortran does not
  ! order the operands of an expression)
  ios = psik_init_vgm(m2, 0.078d0, 0.43d0, 0.036d0, 1.56d0, 24.96d0)
  call check(ios == PSIK_OK .and. psik_theta(m2, -100d0) == psik_theta(m, -100d0), &
       "psik_init_vgm = psik_init with l = 0.5")
  call check(psik_param_count(PSIK_VGM) == 6 .and. psik_param_name(PSIK_VGM, 2_c_int) == "alpha" &
       .and. psik_param_index(PSIK_VGM, "ks") == 4 .and. psik_param_name(PSIK_VGM, 6_c_int) == "", &
       "parameter names, 0-based as in C")
  m2%kind = -7
  ios = psik_init_abi(m2, PSIK_VGM, par, 2_c_int, c_sizeof(m2))
  call check(ios == PSIK_EABI .and. m2%kind == -7, "psik_init_abi mismatch: PSIK_EABI, model untouched")

  ! --- values against C
  call get_command_argument(1, path)
  open(newunit=u, file=trim(path), status="old", action="read", iostat=ios)
  call check(ios == 0, "open C reference " // trim(path))
  if (ios /= 0) stop 1
  read(u, '(a)') cmsg
  par(1:6) = [0.078d0, 0.43d0, 0.036d0, 0.9d0, 24.96d0, 0.5d0]
  call check(psik_check(PSIK_VGM, par, fmsg) == PSIK_EDOMAIN .and. fmsg == cmsg, &
       "psik_check message = C's: " // trim(fmsg))
  ios = psik_init(m2, PSIK_VGM, par)
  call check(ios == PSIK_EDOMAIN .and. m2%kind == 0, "psik_init refuses n = 0.9 and clears the model")

  ! --- presets and tables against C
  read(u, *) np
  par = 0
  read(u, *) par(1:np)
  ios = psik_preset(m2, "Silt_Loam")    ! (separate statement: m2 is read below)
  call check(ios == PSIK_OK .and. m2%npar == np .and. all(m2%par(1:np) == par(1:np)), &
       "psik_preset('Silt_Loam') = C's silt loam")
  call check(psik_preset_name(0_c_int) == "sand" .and. psik_preset_name(99_c_int) == "" .and. &
       psik_preset(m, "peat") == PSIK_EINVAL, "preset names and an unknown class")
  read(u, *) knots, terr_c%theta_rel, terr_c%k_rel
  call check(psik_table_knots(-1d5, -0.01d0, 0d0) == knots, "psik_table_knots = C's")
  allocate(mem(psik_table_bytes(knots)))
  ios = psik_table_build(m2, -1d5, -0.01d0, knots, c_loc(mem), int(size(mem), c_size_t), tab, terr)
  call check(ios == PSIK_OK .and. terr%theta_rel == terr_c%theta_rel .and. &
       terr%k_rel == terr_c%k_rel, "psik_table_build in Fortran memory, same error bounds as C")
  ndiff = 0
  do i = 1, 5
     read(u, *) trow
     call psik_table_eval(tab, trow(1), st)
     tb(i) = trow(1)
     ndiff = ndiff + count([st%theta, st%k, st%capacity, st%dk_dh] /= trow(2:5))
     tref(i, :) = trow(2:5)
  end do
  call psik_table_eval_batch(tab, 5_c_size_t, tb, capacity=tcap)
  ndiff = ndiff + count(tcap /= tref(:, 3))
  call check(ndiff == 0, "table values from Fortran = C's (single and batch)")
  deallocate(mem)

  ! --- fitting against C
  read(u, *) sz_c
  call check(c_sizeof(fdata) == sz_c(1) .and. c_sizeof(fopt) == sz_c(2) .and. &
       c_sizeof(fres) == sz_c(3) .and. c_sizeof(terr) == sz_c(4), &
       "c_sizeof of psik_fit_data, psik_fit_options, psik_fit_result, psik_table_error = C's")
  read(u, *) fsse, fnfree, fflag
  do i = 1, 6
     read(u, *) fpar(i), ferr(i)
  end do
  par(1:6) = [0.078d0, 0.43d0, 0.036d0, 1.56d0, 24.96d0, 0.5d0]
  ios = psik_init(m2, PSIK_VGM, par)
  do i = 1, 12
     ft(i) = psik_theta(m2, fh(i))
  end do
  ios = psik_fit_simple(PSIK_VGM, fh, ft, fres, fmsg)
  call check(ios == PSIK_OK .and. fres%sse == fsse .and. all(fres%par(1:6) == fpar) .and. &
       all(fres%std_err(1:6) == ferr) .and. fres%n_free == fnfree .and. fres%flag(5) == fflag, &
       "psik_fit_simple = C psik_fit (estimates, errors, SSE bit for bit)")
  print '(a,es10.3,a,es10.3)', "# noise-free loam fit from Fortran: largest parameter error ", &
       maxval(abs(fres%par(1:4) - par(1:4)) / par(1:4)), ", sse ", fres%sse
  call check(maxval(abs(fres%par(1:4) - par(1:4)) / par(1:4)) < 1d-7 .and. &
       iand(fres%flag(5), PSIK_FIT_AUTOFIXED) /= 0 .and. index(psik_fit_note(fres), "ks") > 0 .and. &
       psik_fit_stop_name(fres%stop) /= "", &
       "recovers theta_r theta_s alpha n; ks held without K data, and the note says so")
  call psik_fit_defaults(fopt)
  fopt%fixed(1) = 1
  fopt%value(1) = 0.05d0
  fopt%starts = 2
  ios = psik_fit_simple(PSIK_VGM, fh, ft, fres, fmsg, opt=fopt)
  call check(ios == PSIK_OK .and. fres%par(1) == 0.05d0 .and. iand(fres%flag(1), PSIK_FIT_FIXED) /= 0, &
       "options from Fortran: theta_r held at 0.05")
  ft(3) = -1
  ios = psik_fit_simple(PSIK_VGM, fh, ft, fres, fmsg)
  call check(ios == PSIK_EDATA .and. index(fmsg, "retention point 3") > 0, &
       "bad data refused with the point named: " // trim(fmsg))
  call check(abs(psik_t_quantile(0.975d0, 10d0) - 2.2281388519862747d0) < 1d-14, &
       "psik_t_quantile(0.975, 10) = 2.2281388519862747 (mpmath, 40 digits)")
  ncmp = 0; ndiff = 0
  do
     read(u, *, iostat=ios) kind, np
     if (ios /= 0) exit
     par = 0
     read(u, *) par(1:np)
     read(u, *) nh
     if (psik_init(m, int(kind, c_int), par) /= PSIK_OK) then
        ndiff = ndiff + 1
        cycle
     end if
     allocate(hs(nh), th(nh), dk(nh), kk(nh))
     do i = 1, nh
        read(u, *) row
        hs(i) = row(1)
        got = [row(1), psik_se(m, row(1)), psik_theta(m, row(1)), psik_kr(m, row(1)), &
             psik_k(m, row(1)), psik_capacity(m, row(1)), psik_dk_dh(m, row(1)), &
             psik_head(m, row(3)), psik_k_theta(m, row(3)), psik_diffusivity(m, row(3))]
        ncmp = ncmp + 9
        ndiff = ndiff + count(got(2:10) /= row(2:10))
        call psik_eval(m, row(1), st)
        ncmp = ncmp + 6
        ndiff = ndiff + count([st%se, st%theta, st%kr, st%k, st%capacity, st%dk_dh] /= row(11:16))
        bref(i, :) = row(17:20)
     end do
     ! batch with the capacity output absent (NULL in C)
     call psik_eval_batch(m, int(nh, c_size_t), hs, theta=th, k=kk, dk_dh=dk)
     ncmp = ncmp + 3 * nh
     ndiff = ndiff + count(th /= bref(1:nh, 1)) + count(kk /= bref(1:nh, 2)) + &
          count(dk /= bref(1:nh, 4))
     deallocate(hs, th, dk, kk)
  end do
  close(u)
  print '(a,i0,a,i0,a)', "# ", ncmp, " values compared with C, ", ndiff, " differ"
  call check(ncmp > 0 .and. ndiff == 0, "values from Fortran = values from C (bit for bit)")

  print '(a,i0,a,i0,a)', "fortran-binding: ", npass, " passed, ", nfail, " failed"
  if (nfail > 0) stop 1

contains

  subroutine check(cond, what)
    logical, intent(in) :: cond
    character(len=*), intent(in) :: what
    if (cond) then
       npass = npass + 1
       print '(2a)', "ok   ", what
    else
       nfail = nfail + 1
       print '(2a)', "FAIL ", what
    end if
  end subroutine

  integer function off(p)
    type(c_ptr), intent(in) :: p
    off = int(transfer(p, base) - base)
  end function

end program test_binding
