! drainage.f90 - free drainage of a soil column, solved implicitly with psik.
!
! Scenario (invented): a 100 cm lysimeter column of silt loam at the
! Hollerbach test plot, sealed at the top, wetted to a uniform pressure head
! of -15 cm and then left to drain through its open bottom (unit-gradient
! outflow) for 10 days. Units: cm and days.
!
! Soil: van Genuchten-Mualem with silt loam class values (Carsel & Parrish
! 1988, from memory): theta_r 0.067, theta_s 0.45, alpha 0.02 /cm, n 1.41,
! Ks 10.8 cm/day, l = 0.5.
!
! Method: 1-D Richards equation in mixed form (theta in the storage term, so
! the scheme conserves mass to the solver tolerance), cell-centred finite
! volumes, backward Euler in time, Newton's method on the nonlinear system
! each step with the exact Jacobian from psik_capacity (d theta/d h) and
! psik_dk_dh (d K/d h); interface conductivity is the arithmetic mean.
! The step grows when Newton converges quickly and is halved when it fails.
! Output: drainage, storage and the mass balance
!    (storage change + drained water) / drained water.
program drainage
  use, intrinsic :: iso_c_binding
  use psik
  implicit none
  integer, parameter :: n = 20                   ! cells
  real(c_double), parameter :: depth = 100d0, dz = depth / n
  real(c_double), parameter :: t_end = 10d0, h_init = -15d0
  type(psik_model) :: soil
  real(c_double) :: h(n), h_old(n), th_old(n), dh(n), f(n)
  real(c_double) :: a(n), b(n), c(n)
  real(c_double) :: kk(n), kp(n), cap(n), th(n)
  real(c_double) :: t, dt, q_bot, drained, s0, s1, err, fmax
  real(c_double) :: par(6) = [0.067d0, 0.45d0, 0.02d0, 1.41d0, 10.8d0, 0.5d0]
  character(len=256) :: msg
  integer :: it, i, steps, newton_total
  logical :: converged
  real(c_double) :: next_report

  if (psik_init(soil, PSIK_VGM, par) /= PSIK_OK) then
     if (psik_check(PSIK_VGM, par, msg) /= PSIK_OK) print '(2a)', "bad soil: ", trim(msg)
     stop 1
  end if

  h = h_init
  s0 = storage(h)
  print '(a,f12.6,a)', "initial storage     ", s0, " cm"
  t = 0; dt = 1d-3; drained = 0; steps = 0; newton_total = 0
  next_report = 1d0
  print '(a)', "   day   bottom flux (cm/d)   drained (cm)   storage (cm)"
  do while (t < t_end - 1d-12)
     dt = min(dt, t_end - t, next_report - t)
     h_old = h
     do i = 1, n
        th_old(i) = psik_theta(soil, h_old(i))
     end do
     converged = .false.
     do it = 1, 20
        call residual(h, f)
        fmax = maxval(abs(f))
        call tridiag(a, b, c, -f, dh)
        h = h + dh
        newton_total = newton_total + 1
        if (maxval(abs(dh)) < 1d-10 * max(1d0, maxval(abs(h)))) then
           converged = .true.
           exit
        end if
     end do
     if (.not. converged) then
        h = h_old
        dt = dt / 2
        if (dt < 1d-9) stop "drainage: time step collapsed"
        cycle
     end if
     q_bot = psik_k(soil, h(n))                 ! unit-gradient outflow
     drained = drained + dt * q_bot
     t = t + dt
     steps = steps + 1
     if (t >= next_report - 1d-12) then
        print '(f6.2,es21.6,f15.6,f15.6)', t, q_bot, drained, storage(h)
        next_report = next_report + 1d0
     end if
     if (it <= 4) dt = min(dt * 1.5d0, 0.25d0)
     dt = max(dt, 1d-6)
  end do
  s1 = storage(h)
  err = (s1 - s0 + drained) / drained
  print '(a,i0,a,i0,a)', "steps ", steps, ", Newton iterations ", newton_total, ""
  print '(a,f12.6,a)', "final storage       ", s1, " cm"
  print '(a,f12.6,a)', "drained             ", drained, " cm"
  print '(a,es12.3)',  "mass balance error  ", err
  print '(a,f10.4,a,f10.6)', "head at the bottom ", h(n), " cm, theta ", psik_theta(soil, h(n))

contains

  ! Water stored in the column (cm): sum of theta dz.
  function storage(hh) result(s)
    real(c_double), intent(in) :: hh(n)
    real(c_double) :: s
    integer :: j
    s = 0
    do j = 1, n
       s = s + psik_theta(soil, hh(j)) * dz
    end do
  end function

  ! Residual of the mixed-form balance of each cell and its Jacobian (a, b, c).
  ! Cell 1 is at the top; q(j+1/2) is the downward flux between cells j and j+1:
  !   q = K(j+1/2) ((h(j) - h(j+1))/dz + 1),   q(1/2) = 0,   q(n+1/2) = K(h(n)).
  subroutine residual(hh, r)
    real(c_double), intent(in) :: hh(n)
    real(c_double), intent(out) :: r(n)
    real(c_double) :: q, g, km, dq_up, dq_dn
    integer :: j
    do j = 1, n
       th(j) = psik_theta(soil, hh(j))
       kk(j) = psik_k(soil, hh(j))
       kp(j) = psik_dk_dh(soil, hh(j))
       cap(j) = psik_capacity(soil, hh(j))
       r(j) = dz * (th(j) - th_old(j)) / dt
       a(j) = 0; c(j) = 0
       b(j) = dz * cap(j) / dt
    end do
    do j = 1, n - 1                             ! interface j+1/2
       km = 0.5d0 * (kk(j) + kk(j + 1))
       g = (hh(j) - hh(j + 1)) / dz + 1
       q = km * g
       dq_up = 0.5d0 * kp(j) * g + km / dz      ! d q / d h(j)
       dq_dn = 0.5d0 * kp(j + 1) * g - km / dz  ! d q / d h(j+1)
       r(j) = r(j) + q                          ! leaves cell j
       b(j) = b(j) + dq_up
       c(j) = c(j) + dq_dn
       r(j + 1) = r(j + 1) - q                  ! enters cell j+1
       a(j + 1) = a(j + 1) - dq_up
       b(j + 1) = b(j + 1) - dq_dn
    end do
    r(n) = r(n) + kk(n)                         ! free drainage at the bottom
    b(n) = b(n) + kp(n)
  end subroutine

  ! Thomas algorithm for a x = d with sub-diagonal aa, diagonal bb, super cc.
  subroutine tridiag(aa, bb, cc, d, x)
    real(c_double), intent(in) :: aa(n), bb(n), cc(n), d(n)
    real(c_double), intent(out) :: x(n)
    real(c_double) :: cp(n), dp(n), w
    integer :: j
    cp(1) = cc(1) / bb(1)
    dp(1) = d(1) / bb(1)
    do j = 2, n
       w = bb(j) - aa(j) * cp(j - 1)
       cp(j) = cc(j) / w
       dp(j) = (d(j) - aa(j) * dp(j - 1)) / w
    end do
    x(n) = dp(n)
    do j = n - 1, 1, -1
       x(j) = dp(j) - cp(j) * x(j + 1)
    end do
  end subroutine

end program drainage
